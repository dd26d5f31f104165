// The audit trail: nobody can change or remove an entry, not even the database owner, and the
// JSON route answers 401/403 as JSON and filters by job, person and day.
import { eq, sql } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { auditEntries, jobs } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const review = await import("@/lib/review/service");
const { GET } = await import("@/app/api/audit/route");
const h = await import("../sheets/helpers");
const b = await import("../bench/helpers");

const db = () => state.t!.db;
type Actor = Awaited<ReturnType<typeof h.actorOf>>;
let rhea: Actor, ines: Actor, admin: Actor;
let job141: string, job143: string;

interface AuditBody {
  entries: Array<{ id: number; at: string; actorId: string | null; actorName: string | null; action: string; jobId: string | null; jobNumber: string | null }>;
  total: number;
  page: number;
  pageSize: number;
  pageCount: number;
}

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  rhea = await h.actorOf(db(), "rhea@millrace.example");
  ines = await h.actorOf(db(), "ines@millrace.example");
  admin = await h.actorOf(db(), "admin@millrace.example");
  job141 = (await db().select().from(jobs).where(eq(jobs.number, "MHW-0141")))[0]!.id;
  job143 = (await db().select().from(jobs).where(eq(jobs.number, "MHW-0143")))[0]!.id;
  // Decisions by the supervisor on two jobs, so the filters have something to tell apart.
  await review.reviewSeat(db(), rhea, { seatId: await b.seatId(db(), "MHW-0141", "1I1"), decision: "approved", comment: "Band even" });
  await review.reviewHead(db(), rhea, { jobId: job143, decision: "sent_back", comment: "Deck flatness missing" });
});
afterAll(async () => {
  await state.t?.cleanup();
});

function signInAs(a: Actor | null) {
  state.session = a ? { user: { id: a.id } } : null;
}
async function get(query: string) {
  const res = await GET(new NextRequest(`${b.BASE_URL}/api/audit${query}`), {});
  return { status: res.status, body: (await res.json()) as AuditBody & { error?: string; message?: string; fieldErrors?: Record<string, string[]> } };
}
const dayOf = (iso: string) => iso.slice(0, 10);
const shiftDay = (day: string, by: number) => {
  const d = new Date(`${day}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + by);
  return d.toISOString().slice(0, 10);
};

describe("audit entries are append-only", () => {
  it("the database owner cannot update, delete or truncate them", async () => {
    const [entry] = await db().select().from(auditEntries).orderBy(sql`id desc`).limit(1);
    const count = async () => (await db().select({ n: sql<number>`count(*)::int` }).from(auditEntries))[0]!.n;
    const before = await count();
    await expect(db().update(auditEntries).set({ action: "rewritten" }).where(eq(auditEntries.id, entry!.id))).rejects.toThrow();
    await expect(db().delete(auditEntries).where(eq(auditEntries.id, entry!.id))).rejects.toThrow();
    await expect(db().execute(sql`truncate audit_entries`)).rejects.toThrow();
    const [after] = await db().select().from(auditEntries).where(eq(auditEntries.id, entry!.id));
    expect(after).toEqual(entry);
    expect(await count()).toBe(before);
  });
});

describe("GET /api/audit", () => {
  beforeEach(() => signInAs(null));

  it("answers 401 to anonymous callers and 403 to technicians, as JSON", async () => {
    const anon = await get("");
    expect(anon).toMatchObject({ status: 401, body: { error: "unauthorized" } });
    signInAs(ines);
    const tech = await get("");
    expect(tech).toMatchObject({ status: 403, body: { error: "forbidden", message: "Only a supervisor can audit and sign off work." } });
  });

  it("lists newest first, 50 to a page, for supervisors and admins", async () => {
    signInAs(admin);
    const all = await get("");
    expect(all.status).toBe(200);
    expect(all.body.pageSize).toBe(50);
    expect(all.body.entries.length).toBe(Math.min(50, all.body.total));
    const ids = all.body.entries.map((e) => e.id);
    expect(ids).toEqual([...ids].sort((x, y) => y - x));
    expect(all.body.entries[0]).toMatchObject({ action: "job.sent_back", actorName: "Rhea Castellan", jobNumber: "MHW-0143" });
    const beyond = await get(`?page=${all.body.pageCount + 1}`);
    expect(beyond.body.entries).toEqual([]);
  });

  it("filters by job, by person and by day", async () => {
    signInAs(rhea);
    const byJob = await get(`?job=${job143}`);
    expect(byJob.body.total).toBeGreaterThan(0);
    expect(new Set(byJob.body.entries.map((e) => e.jobNumber))).toEqual(new Set(["MHW-0143"]));

    const byPerson = await get(`?person=${rhea.id}`);
    expect(byPerson.body.entries.map((e) => e.action).sort()).toEqual(["job.sent_back", "seat.approved"]);

    const both = await get(`?person=${rhea.id}&job=${job141}`);
    expect(both.body.entries.map((e) => e.action)).toEqual(["seat.approved"]);

    // The day is taken from the entry itself, so the test holds across midnight.
    const day = dayOf(both.body.entries[0]!.at);
    expect((await get(`?person=${rhea.id}&from=${day}&to=${day}`)).body.total).toBe(2);
    expect((await get(`?person=${rhea.id}&from=${shiftDay(day, 1)}`)).body.total).toBe(0);
    expect((await get(`?person=${rhea.id}&to=${shiftDay(day, -1)}`)).body.total).toBe(0);
  });

  it("refuses bad filters with 400 and field messages", async () => {
    signInAs(rhea);
    const bad = await get("?job=not-a-job&from=14/03/2026");
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.fieldErrors ?? {}).sort()).toEqual(["from", "job"]);
    const reversed = await get("?from=2026-03-14&to=2026-03-01");
    expect(reversed).toMatchObject({ status: 400, body: { fieldErrors: { to: ["The start date is after the end date."] } } });
  });
});
