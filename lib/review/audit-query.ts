// The audit trail's filters read from a query string, for the JSON route and the CSV export alike:
// a bad value answers 400 with the first problem as a sentence and every field's message.
import { BadRequestError, fieldErrorsOf } from "@/lib/errors";
import { auditFilterSchema, type AuditFilter } from "./validation";

/** The CSV export's columns: the entry in words, then the raw action code, ISO time and id. */
export const AUDIT_CSV_COLUMNS = ["when", "person", "entry", "changes", "job", "seat", "action", "at_iso", "entry_id"] as const;

export const AUDIT_QUERY_KEYS = ["job", "person", "from", "to", "before"] as const;

export function auditQueryValues(get: (key: string) => string | null | undefined): Record<string, string | undefined> {
  return Object.fromEntries(AUDIT_QUERY_KEYS.map((k) => [k, get(k) ?? undefined]));
}

export function parseAuditQuery(q: URLSearchParams): AuditFilter {
  const parsed = auditFilterSchema.safeParse(auditQueryValues((k) => q.get(k)));
  if (parsed.success) return parsed.data;
  const fieldErrors = fieldErrorsOf(parsed.error);
  const first = Object.values(fieldErrors).flat()[0] ?? "Some filters are not valid.";
  throw new BadRequestError(`The audit trail's filters are not valid: ${first}`, fieldErrors);
}

/** The filters back as a query string (no empty keys), for links and the export. */
export function auditQueryString(filter: Partial<AuditFilter>, extra: Record<string, string | number | undefined> = {}): string {
  const q = new URLSearchParams();
  for (const k of ["job", "person", "from", "to"] as const) if (filter[k]) q.set(k, String(filter[k]));
  for (const [k, v] of Object.entries(extra)) if (v !== undefined && v !== "") q.set(k, String(v));
  return q.toString();
}
