// The filtered audit trail as a CSV file: each entry in words, its changes, and beside them the raw
// action code and the ISO time, for a spreadsheet or an auditor's own tools.
import Papa from "papaparse";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { formatWhen } from "@/lib/dates";
import { exportAuditEntries, shopNames } from "@/lib/review/audit-log";
import { AUDIT_CSV_COLUMNS, parseAuditQuery } from "@/lib/review/audit-query";
import { changeText, diffEntry, entryText } from "@/lib/review/audit-words";

export const GET = guardedRoute("jobs:audit", async (req, _ctx, actor) => {
  const { before: _ignored, ...filter } = parseAuditQuery(req.nextUrl.searchParams);
  const db = await getDb();
  const [{ entries, timeZone }, names] = await Promise.all([exportAuditEntries(db, actor.shopId, filter), shopNames(db, actor.shopId)]);
  // In the order of AUDIT_CSV_COLUMNS.
  const rows = entries.map((e) => [
    formatWhen(e.at, timeZone, { seconds: true }),
    e.actorName ?? "Someone",
    entryText(e, names),
    diffEntry(e, names).map(changeText).join("; "),
    e.jobNumber ?? "",
    e.seatCode ?? "",
    e.action,
    e.at,
    e.id,
  ]);
  // escapeFormulae: a comment starting with "=" or "+" stays text in a spreadsheet.
  const csv = Papa.unparse({ fields: [...AUDIT_CSV_COLUMNS], data: rows }, { escapeFormulae: true });
  const stamp = new Date().toISOString().slice(0, 10);
  return new Response(`\uFEFF${csv}\r\n`, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="audit-trail-${stamp}.csv"`,
      "cache-control": "no-store",
    },
  });
});
