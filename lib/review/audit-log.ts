// Reads of the append-only audit trail for the audit page and its JSON route: newest first,
// scoped to the caller's shop, filtered by job, person and day, a page at a time.
import { and, asc, desc, eq, gte, isNull, lt, or, sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { auditEntries, jobs, users } from "@/db/schema";
import type { AuditFilter } from "./validation";

export const AUDIT_PAGE_SIZE = 50;

export interface AuditRow {
  id: number;
  at: string;
  actorId: string | null;
  actorName: string | null;
  action: string;
  entityType: string;
  entityId: string;
  jobId: string | null;
  jobNumber: string | null;
  before: unknown;
  after: unknown;
}

export interface AuditPage {
  entries: AuditRow[];
  page: number;
  pageSize: number;
  total: number;
  pageCount: number;
}

/** The day after a YYYY-MM-DD date, so "to" includes the whole of its day (UTC). */
function dayAfter(day: string): Date {
  const d = new Date(`${day}T00:00:00.000Z`);
  d.setUTCDate(d.getUTCDate() + 1);
  return d;
}

export async function listAuditEntries(db: Db, shopId: string, filter: AuditFilter): Promise<AuditPage> {
  // An entry belongs to the shop of its job; one without a job (people, settings) to its actor's shop.
  const conditions: SQL[] = [or(eq(jobs.shopId, shopId), and(isNull(auditEntries.jobId), eq(users.shopId, shopId)))!];
  if (filter.job) conditions.push(eq(auditEntries.jobId, filter.job));
  if (filter.person) conditions.push(eq(auditEntries.actorId, filter.person));
  if (filter.from) conditions.push(gte(auditEntries.at, new Date(`${filter.from}T00:00:00.000Z`)));
  if (filter.to) conditions.push(lt(auditEntries.at, dayAfter(filter.to)));
  const where = and(...conditions);
  const [{ total }] = (await db
    .select({ total: sql<number>`count(*)::int` })
    .from(auditEntries)
    .leftJoin(jobs, eq(jobs.id, auditEntries.jobId))
    .leftJoin(users, eq(users.id, auditEntries.actorId))
    .where(where)) as [{ total: number }];
  const rows = await db
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
    })
    .from(auditEntries)
    .leftJoin(jobs, eq(jobs.id, auditEntries.jobId))
    .leftJoin(users, eq(users.id, auditEntries.actorId))
    .where(where)
    .orderBy(desc(auditEntries.at), desc(auditEntries.id))
    .limit(AUDIT_PAGE_SIZE)
    .offset((filter.page - 1) * AUDIT_PAGE_SIZE);
  return {
    entries: rows.map((r) => ({ ...r, at: r.at.toISOString() })),
    page: filter.page,
    pageSize: AUDIT_PAGE_SIZE,
    total,
    pageCount: Math.max(1, Math.ceil(total / AUDIT_PAGE_SIZE)),
  };
}

/** The choices for the filters: the shop's jobs by number and its people by name. */
export async function auditFilterOptions(db: Db, shopId: string) {
  const jobRows = await db.select({ id: jobs.id, number: jobs.number }).from(jobs).where(eq(jobs.shopId, shopId)).orderBy(desc(jobs.number));
  const people = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.shopId, shopId)).orderBy(asc(users.name));
  return { jobs: jobRows, people };
}
