// The audit trail as JSON for other tools: the same filters and pages as the audit page.
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { listAuditEntries } from "@/lib/review/audit-log";
import { auditFilterSchema } from "@/lib/review/validation";

export const GET = guardedRoute("jobs:audit", async (req, _ctx, actor) => {
  const q = req.nextUrl.searchParams;
  const filter = auditFilterSchema.parse({
    job: q.get("job") ?? undefined,
    person: q.get("person") ?? undefined,
    from: q.get("from") ?? undefined,
    to: q.get("to") ?? undefined,
    page: q.get("page") ?? undefined,
  });
  return NextResponse.json(await listAuditEntries(await getDb(), actor.shopId, filter));
});
