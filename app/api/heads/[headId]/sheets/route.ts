import { and, eq } from "drizzle-orm";
import Papa from "papaparse";
import { getDb } from "@/db/client";
import { heads, jobs } from "@/db/schema";
import { guardedRoute } from "@/lib/auth/guard";
import { NotFoundError } from "@/lib/errors";
import { getTorqueSheets, listMeasurements } from "@/lib/heads/sheets";
import { parseId } from "@/lib/http";

/** Every sheet of a head as one CSV: measurements (clearances included) and torque ticks. */
export const GET = guardedRoute("jobs:read", async (_req, ctx: RouteContext<"/api/heads/[headId]/sheets">, actor) => {
  const { headId } = await ctx.params;
  const db = await getDb();
  const [row] = await db
    .select({ jobId: jobs.id, number: jobs.number })
    .from(heads)
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(heads.id, parseId(headId, "headId")), eq(jobs.shopId, actor.shopId)));
  if (!row) throw new NotFoundError("That head does not exist in your shop.");
  const measured = await listMeasurements(db, actor.shopId, row.jobId);
  const torque = await getTorqueSheets(db, actor.shopId, row.jobId);
  const records: Array<Record<string, string | number>> = measured.map((m) => ({
    sheet: m.kind === "journal_clearance" ? "journal clearance" : "measurement",
    item: m.label,
    where: m.where,
    value: m.valueSi,
    unit: m.kind === "spring_load" ? "N" : "mm",
    spec_min: m.specMin ?? "",
    spec_max: m.specMax ?? "",
    service_limit: m.serviceLimit ?? "",
    spec_source: m.specSource ?? "",
    result: m.verdict ?? "",
    method: m.method ?? "",
    recorded_at: m.recordedAt,
  }));
  for (const c of torque.camshafts) {
    if (!c.sheet) continue;
    for (const st of c.sheet.stages) {
      for (const bolt of c.sheet.order) {
        const done = c.sheet.ticks.some((t) => t.stage === st.stage && t.boltId === bolt);
        records.push({
          sheet: "cap torque",
          item: `${c.label} ${st.label}`,
          where: bolt,
          value: Math.round(st.nm * 10) / 10,
          unit: "N·m",
          spec_min: "",
          spec_max: "",
          service_limit: "",
          spec_source: c.sheet.specSource,
          result: done ? "ticked" : "not yet",
          method: c.sheet.orderSource,
          recorded_at: "",
        });
      }
    }
  }
  const csv = Papa.unparse(records, {
    columns: ["sheet", "item", "where", "value", "unit", "spec_min", "spec_max", "service_limit", "spec_source", "result", "method", "recorded_at"],
  });
  return new Response(csv, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="${row.number}-sheets.csv"`,
    },
  });
});
