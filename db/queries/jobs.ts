// Reads for the jobs board and the job page. Every read is scoped to the caller's shop.
import { and, asc, eq, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Db } from "@/db/client";
import { NotFoundError } from "@/lib/errors";
import {
  camshafts,
  customers,
  heads,
  jobs,
  journals,
  lappingSessions,
  seats,
  strokes,
  users,
  valves,
  type Head,
  type JobStatus,
  type Seat,
  type Valve,
} from "@/db/schema";

export interface JobBoardRow {
  id: string;
  number: string;
  status: JobStatus;
  customerName: string;
  engineDescription: string;
  headSummary: string;
  technicianId: string | null;
  technicianName: string | null;
  promisedOn: string | null;
  seatCount: number;
  seatsDone: number;
  updatedAt: string;
}

const technician = alias(users, "technician");

export function headSummary(h: Pick<Head, "arrangement" | "cylinderCount" | "intakeValvesPerCylinder" | "exhaustValvesPerCylinder" | "camshaftCount">): string {
  const valves = h.cylinderCount * (h.intakeValvesPerCylinder + h.exhaustValvesPerCylinder);
  const layout = h.arrangement === "v" ? `V${h.cylinderCount}` : `Inline-${h.cylinderCount}`;
  const cams = h.camshaftCount === 0 ? "pushrod" : `${h.camshaftCount} cam${h.camshaftCount === 1 ? "" : "s"}`;
  return `${layout}, ${valves} valves, ${cams}`;
}

export async function listJobs(db: Db, shopId: string): Promise<JobBoardRow[]> {
  const rows = await db
    .select({
      id: jobs.id,
      number: jobs.number,
      status: jobs.status,
      customerName: customers.name,
      engineDescription: jobs.engineDescription,
      technicianId: jobs.assignedTechnicianId,
      technicianName: technician.name,
      promisedOn: jobs.promisedOn,
      updatedAt: jobs.updatedAt,
      arrangement: sql<Head["arrangement"] | null>`min(${heads.arrangement}::text)`,
      cylinderCount: sql<number | null>`min(${heads.cylinderCount})`,
      intakeValvesPerCylinder: sql<number | null>`min(${heads.intakeValvesPerCylinder})`,
      exhaustValvesPerCylinder: sql<number | null>`min(${heads.exhaustValvesPerCylinder})`,
      camshaftCount: sql<number | null>`min(${heads.camshaftCount})`,
      seatCount: sql<number>`count(${seats.id})::int`,
      seatsDone: sql<number>`count(${seats.id}) filter (where ${seats.state} in ('settled','approved'))::int`,
    })
    .from(jobs)
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .leftJoin(technician, eq(technician.id, jobs.assignedTechnicianId))
    .leftJoin(heads, eq(heads.jobId, jobs.id))
    .leftJoin(seats, eq(seats.headId, heads.id))
    .where(eq(jobs.shopId, shopId))
    .groupBy(jobs.id, customers.name, technician.name)
    .orderBy(asc(jobs.promisedOn), asc(jobs.number));

  return rows.map((r) => ({
    id: r.id,
    number: r.number,
    status: r.status,
    customerName: r.customerName,
    engineDescription: r.engineDescription,
    headSummary:
      r.arrangement && r.cylinderCount
        ? headSummary({
            arrangement: r.arrangement,
            cylinderCount: r.cylinderCount,
            intakeValvesPerCylinder: r.intakeValvesPerCylinder ?? 0,
            exhaustValvesPerCylinder: r.exhaustValvesPerCylinder ?? 0,
            camshaftCount: r.camshaftCount ?? 0,
          })
        : "No head recorded",
    technicianId: r.technicianId,
    technicianName: r.technicianName,
    promisedOn: r.promisedOn,
    seatCount: r.seatCount,
    seatsDone: r.seatsDone,
    updatedAt: r.updatedAt.toISOString(),
  }));
}

export interface JobDetail {
  id: string;
  number: string;
  status: JobStatus;
  engineDescription: string;
  promisedOn: string | null;
  notes: string | null;
  engineSpecId: string | null;
  customer: { id: string; name: string; email: string | null; phone: string | null };
  /** `left`: the person was deactivated since; the job keeps their name. */
  technician: { id: string; name: string; left: boolean } | null;
  heads: Array<
    Head & {
      camshafts: Array<{ id: string; position: number; label: string; journalCount: number }>;
      seats: Array<Seat & { valve: Pick<Valve, "id" | "tag" | "partNumber" | "serial" | "lappedInSeatId"> | null }>;
    }
  >;
}

export async function getJob(db: Db, shopId: string, jobId: string): Promise<JobDetail | null> {
  const [row] = await db
    .select({ job: jobs, customer: customers, techName: technician.name, techActive: technician.active })
    .from(jobs)
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .leftJoin(technician, eq(technician.id, jobs.assignedTechnicianId))
    .where(and(eq(jobs.id, jobId), eq(jobs.shopId, shopId)))
    .limit(1);
  if (!row) return null;

  const headRows = await db.select().from(heads).where(eq(heads.jobId, jobId)).orderBy(asc(heads.label));
  const result: JobDetail["heads"] = [];
  for (const h of headRows) {
    const cams = await db
      .select({
        id: camshafts.id,
        position: camshafts.position,
        label: camshafts.label,
        journalCount: sql<number>`count(${journals.id})::int`,
      })
      .from(camshafts)
      .leftJoin(journals, eq(journals.camshaftId, camshafts.id))
      .where(eq(camshafts.headId, h.id))
      .groupBy(camshafts.id)
      .orderBy(asc(camshafts.position));
    const seatRows = await db
      .select({
        seat: seats,
        valve: { id: valves.id, tag: valves.tag, partNumber: valves.partNumber, serial: valves.serial, lappedInSeatId: valves.lappedInSeatId },
      })
      .from(seats)
      .leftJoin(valves, eq(valves.seatId, seats.id))
      .where(eq(seats.headId, h.id))
      .orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position));
    result.push({
      ...h,
      camshafts: cams,
      seats: seatRows.map((s) => ({ ...s.seat, valve: s.valve?.id ? s.valve : null })),
    });
  }

  return {
    id: row.job.id,
    number: row.job.number,
    status: row.job.status,
    engineDescription: row.job.engineDescription,
    promisedOn: row.job.promisedOn,
    notes: row.job.notes,
    engineSpecId: row.job.engineSpecId,
    customer: { id: row.customer.id, name: row.customer.name, email: row.customer.email, phone: row.customer.phone },
    technician:
      row.job.assignedTechnicianId && row.techName ? { id: row.job.assignedTechnicianId, name: row.techName, left: row.techActive === false } : null,
    heads: result,
  };
}

/** Each seat's latest stage's onset contrasts in stroke order (fine once fine has strokes). */
export async function seatCurves(db: Db, headId: string): Promise<Map<string, number[]>> {
  const rows = await db
    .select({
      seatId: lappingSessions.seatId,
      stage: lappingSessions.stage,
      contrastDb: strokes.contrastDb,
    })
    .from(strokes)
    .innerJoin(lappingSessions, eq(lappingSessions.id, strokes.sessionId))
    .innerJoin(seats, eq(seats.id, lappingSessions.seatId))
    .where(eq(seats.headId, headId))
    .orderBy(asc(lappingSessions.startedAt), asc(lappingSessions.id), asc(strokes.startS), asc(strokes.index));
  const bySeat = new Map<string, { coarse: number[]; fine: number[] }>();
  for (const r of rows) {
    const entry = bySeat.get(r.seatId) ?? { coarse: [], fine: [] };
    entry[r.stage].push(r.contrastDb);
    bySeat.set(r.seatId, entry);
  }
  return new Map([...bySeat].map(([id, c]) => [id, c.fine.length ? c.fine : c.coarse]));
}

/** Whether a seat of this id is on a job of the caller's shop: the cheap check a seat's pages make before anything streams. */
export async function seatInShop(db: Db, shopId: string, seatId: string): Promise<boolean> {
  const rows = await db
    .select({ id: seats.id })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(seats.id, seatId), eq(jobs.shopId, shopId)))
    .limit(1);
  return rows.length > 0;
}

/**
 * A seat of the caller's shop with its job (on a transaction or the database). Another shop's
 * seat answers exactly like a missing one: NotFoundError.
 */
export async function seatWithJob(db: Pick<Db, "select">, shopId: string, seatId: string): Promise<{ seat: Seat; job: typeof jobs.$inferSelect }> {
  const [row] = await db
    .select({ seat: seats, job: jobs })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(seats.id, seatId), eq(jobs.shopId, shopId)))
    .limit(1);
  if (!row) throw new NotFoundError("That seat does not exist in your shop.");
  return row;
}
