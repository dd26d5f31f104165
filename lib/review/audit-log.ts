// Reads of the append-only audit trail for the audit page, its JSON route and its CSV export:
// newest first, scoped to the caller's shop, filtered by job, person and day (days in the shop's
// time zone), a page at a time by keyset on the entry's id.
import { and, asc, desc, eq, gte, isNull, lt, or, sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { auditEntries, jobs, seats, users } from "@/db/schema";
import { getShopTimeZone } from "@/db/queries/shops";
import { nextDay, startOfDayIn } from "@/lib/dates";
import { groupBursts, type AuditEntryFacts } from "./audit-words";
import type { AuditFilter } from "./validation";

export const AUDIT_PAGE_SIZE = 50;
/** How far past a page's end a read looks, so a burst is not cut in two between pages. */
const BURST_LOOKAHEAD = 100;
/** The most entries one CSV export holds. */
export const AUDIT_EXPORT_LIMIT = 50_000;

export interface AuditRow extends AuditEntryFacts {
  seatCode: string | null;
}

export interface AuditPage {
  entries: AuditRow[];
  pageSize: number;
  /** Entries matching the filters, on every page. */
  total: number;
  /** The `before` of the next (older) page, or null on the last. */
  nextBefore: number | null;
  /** The shop's time zone, in which the filters' days are read. */
  timeZone: string;
}

/** The filters as SQL: the shop's entries, by job, person and day in the shop's time zone. */
function whereOf(shopId: string, filter: Omit<AuditFilter, "before">, timeZone: string): SQL {
  // An entry belongs to the shop of its job; one without a job (people, settings) to its actor's shop.
  const conditions: SQL[] = [or(eq(jobs.shopId, shopId), and(isNull(auditEntries.jobId), eq(users.shopId, shopId)))!];
  if (filter.job) conditions.push(eq(auditEntries.jobId, filter.job));
  if (filter.person) conditions.push(eq(auditEntries.actorId, filter.person));
  if (filter.from) conditions.push(gte(auditEntries.at, startOfDayIn(filter.from, timeZone)));
  // "to" includes the whole of its day: up to the start of the next day, there.
  if (filter.to) conditions.push(lt(auditEntries.at, startOfDayIn(nextDay(filter.to), timeZone)));
  return and(...conditions)!;
}

function selectRows(db: Db, where: SQL, limit: number) {
  return db
    .select({
      id: auditEntries.id,
      at: auditEntries.at,
      actorId: auditEntries.actorId,
      actorName: users.name,
      action: auditEntries.action,
      entityType: auditEntries.entityType,
      entityId: auditEntries.entityId,
      jobId: auditEntries.jobId,
      jobNumber: jobs.number,
      before: auditEntries.before,
      after: auditEntries.after,
      seatCylinder: seats.cylinder,
      seatKind: seats.kind,
      seatPosition: seats.position,
    })
    .from(auditEntries)
    .leftJoin(jobs, eq(jobs.id, auditEntries.jobId))
    .leftJoin(users, eq(users.id, auditEntries.actorId))
    // An entry about a seat names it by id (text); its code is read from the seat itself.
    .leftJoin(seats, and(eq(auditEntries.entityType, "seat"), sql`${seats.id}::text = ${auditEntries.entityId}`))
    .where(where)
    .orderBy(desc(auditEntries.id))
    .limit(limit);
}

type RawRow = Awaited<ReturnType<typeof selectRows>>[number];

function toRow(r: RawRow): AuditRow {
  const { seatCylinder, seatKind, seatPosition, ...rest } = r;
  const seatCode = seatCylinder !== null && seatKind !== null && seatPosition !== null ? `${seatCylinder}${seatKind === "intake" ? "I" : "E"}${seatPosition}` : null;
  return { ...rest, at: r.at.toISOString(), seatCode };
}

export async function listAuditEntries(db: Db, shopId: string, filter: AuditFilter, pageSize = AUDIT_PAGE_SIZE): Promise<AuditPage> {
  const timeZone = await getShopTimeZone(db, shopId);
  const where = whereOf(shopId, filter, timeZone);
  const [{ total }] = (await db
    .select({ total: sql<number>`count(*)::int` })
    .from(auditEntries)
    .leftJoin(jobs, eq(jobs.id, auditEntries.jobId))
    .leftJoin(users, eq(users.id, auditEntries.actorId))
    .where(where)) as [{ total: number }];
  const limit = pageSize + BURST_LOOKAHEAD;
  const pageWhere = filter.before ? and(where, lt(auditEntries.id, filter.before))! : where;
  const rows = (await selectRows(db, pageWhere, limit)).map(toRow);
  // Whole bursts only: a page ends at the end of a group, so a burst reads as one line.
  const entries: AuditRow[] = [];
  for (const g of groupBursts(rows)) {
    if (entries.length >= pageSize) break;
    entries.push(...g.entries);
  }
  const more = entries.length < rows.length || rows.length === limit;
  return { entries, pageSize, total, nextBefore: more && entries.length ? entries.at(-1)!.id : null, timeZone };
}

/** Every entry matching the filters (up to AUDIT_EXPORT_LIMIT), newest first, for the CSV export. */
export async function exportAuditEntries(db: Db, shopId: string, filter: Omit<AuditFilter, "before">) {
  const timeZone = await getShopTimeZone(db, shopId);
  const rows = (await selectRows(db, whereOf(shopId, filter, timeZone), AUDIT_EXPORT_LIMIT)).map(toRow);
  return { entries: rows, timeZone };
}

/** The choices for the filters: the shop's jobs by number and its people by name. */
export async function auditFilterOptions(db: Db, shopId: string) {
  const jobRows = await db.select({ id: jobs.id, number: jobs.number }).from(jobs).where(eq(jobs.shopId, shopId)).orderBy(desc(jobs.number));
  const people = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.shopId, shopId)).orderBy(asc(users.name));
  return { jobs: jobRows, people };
}

/** The shop's people by id, for the words of entries that name a person by id. */
export async function shopNames(db: Db, shopId: string): Promise<Map<string, string>> {
  const people = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.shopId, shopId));
  return new Map(people.map((p) => [p.id, p.name]));
}
