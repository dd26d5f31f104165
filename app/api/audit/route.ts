// The audit trail as JSON for other tools: the same filters and pages as the audit page, each
// entry with its sentence and its changes in words beside the raw record.
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { listAuditEntries, shopNames } from "@/lib/review/audit-log";
import { parseAuditQuery } from "@/lib/review/audit-query";
import { changeText, diffEntry, entryText } from "@/lib/review/audit-words";

export const GET = guardedRoute("jobs:audit", async (req, _ctx, actor) => {
  const filter = parseAuditQuery(req.nextUrl.searchParams);
  const db = await getDb();
  const [page, names] = await Promise.all([listAuditEntries(db, actor.shopId, filter), shopNames(db, actor.shopId)]);
  return NextResponse.json({
    ...page,
    entries: page.entries.map((e) => ({ ...e, words: entryText(e, names), changes: diffEntry(e, names).map(changeText) })),
  });
});
