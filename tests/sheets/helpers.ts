// Shared look-ups for the head sheet tests: demo jobs, heads, seats and valves by their codes,
// actors by e-mail, forms and row counts. The demo figures they find are invented (db/seed.ts).
import { and, asc, eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import {
  auditEntries,
  camshafts,
  heads,
  jobs,
  journals,
  measurements,
  seats,
  torqueSheets,
  torqueTicks,
  users,
  valves,
} from "@/db/schema";
import type { Actor } from "@/lib/auth/guard";
import { DEFAULT_HEAD_LAYOUT, seatCode } from "@/lib/heads/layout";

export const form = (o: Record<string, string>): FormData => {
  const f = new FormData();
  for (const [k, v] of Object.entries(o)) f.set(k, v);
  return f;
};

export async function actorOf(db: Db, email: string): Promise<Actor> {
  const [u] = await db.select().from(users).where(eq(users.email, email));
  if (!u) throw new Error(`no user ${email}`);
  return { id: u.id, shopId: u.shopId, name: u.name, email: u.email, role: u.role };
}

export async function userId(db: Db, email: string): Promise<string> {
  return (await actorOf(db, email)).id;
}

export interface DemoHead {
  jobId: string;
  headId: string;
  camshafts: Array<{ id: string; label: string; journalIds: string[] }>;
  seatByCode: Map<string, string>;
}

export async function demoHead(db: Db, jobNumber: string): Promise<DemoHead> {
  const [row] = await db
    .select({ jobId: jobs.id, headId: heads.id })
    .from(jobs)
    .innerJoin(heads, eq(heads.jobId, jobs.id))
    .where(eq(jobs.number, jobNumber));
  if (!row) throw new Error(`no job ${jobNumber}`);
  const cams = await db.select().from(camshafts).where(eq(camshafts.headId, row.headId)).orderBy(asc(camshafts.position));
  const out: DemoHead["camshafts"] = [];
  for (const c of cams) {
    const js = await db.select().from(journals).where(eq(journals.camshaftId, c.id)).orderBy(asc(journals.position));
    out.push({ id: c.id, label: c.label, journalIds: js.map((j) => j.id) });
  }
  const ss = await db.select().from(seats).where(eq(seats.headId, row.headId));
  return { ...row, camshafts: out, seatByCode: new Map(ss.map((s) => [seatCode(s), s.id])) };
}

/** The valve sitting in a seat, by the seat's code ("3I1"). */
export async function valveIn(db: Db, head: DemoHead, code: string) {
  const seatId = head.seatByCode.get(code);
  if (!seatId) throw new Error(`no seat ${code}`);
  const [v] = await db.select().from(valves).where(eq(valves.seatId, seatId));
  if (!v) throw new Error(`no valve in ${code}`);
  return v;
}

export async function valveByTag(db: Db, head: DemoHead, tag: string) {
  const [v] = await db.select().from(valves).where(and(eq(valves.headId, head.headId), eq(valves.tag, tag)));
  if (!v) throw new Error(`no valve ${tag}`);
  return v;
}

export async function setStatus(db: Db, jobId: string, status: typeof jobs.$inferSelect.status): Promise<void> {
  await db.update(jobs).set({ status }).where(eq(jobs.id, jobId));
}

const countOf = async (db: Db, table: typeof measurements | typeof torqueSheets | typeof torqueTicks | typeof valves | typeof auditEntries) =>
  (await db.select({ n: sql<number>`count(*)::int` }).from(table))[0]!.n;

/** Row counts of everything a sheet write touches, plus every valve's seat and identity. */
export async function snapshot(db: Db) {
  const vs = await db.select().from(valves).orderBy(asc(valves.id));
  return {
    measurements: await countOf(db, measurements),
    torqueSheets: await countOf(db, torqueSheets),
    torqueTicks: await countOf(db, torqueTicks),
    valves: await countOf(db, valves),
    auditEntries: await countOf(db, auditEntries),
    valveRows: vs.map((v) => ({ id: v.id, seatId: v.seatId, tag: v.tag, partNumber: v.partNumber, serial: v.serial, lapped: v.lappedInSeatId })),
  };
}

/** A complete job form for the 16-valve inline four of the demo (invented demo layout). */
export function jobForm(overrides: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    customerId: "",
    newCustomerName: "Ferrand Ridge Haulage",
    engineDescription: "Varda VX18 1.8 inline-4, twin cam, 16 valves",
    engineSpecId: "",
    promisedOn: "",
    assignedTechnicianId: "",
    notes: "",
    headLabel: "Cylinder head",
    ...DEFAULT_HEAD_LAYOUT,
    ...overrides,
  };
}

/** A journal clearance read from the narrow strip (0.025–0.076 mm, retail guides; common practice), as the sheet sends it. */
export const stripClearance = (journalId: string, clearanceMm: number) => ({
  journalId,
  clearanceMm,
  method: "strip" as const,
  stripId: "narrow" as const,
  boreMm: null,
  journalMm: null,
  enteredUnit: "mm",
  spec: null,
});
