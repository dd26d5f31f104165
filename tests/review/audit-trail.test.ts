// The audit trail: nobody can change or remove an entry, not even the database owner; the JSON
// route answers 401/403 as JSON, filters by job, person and day (days in the shop's time zone) and
// pages by keyset without cutting a burst in two; the CSV export holds the filtered entries in words.
import { eq, sql } from "drizzle-orm";
import { NextRequest } from "next/server";
import Papa from "papaparse";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { auditEntries, jobs, shops } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const review = await import("@/lib/review/service");
const { GET } = await import("@/app/api/audit/route");
const csvRoute = await import("@/app/api/audit/csv/route");
const { listAuditEntries } = await import("@/lib/review/audit-log");
const { AUDIT_CSV_COLUMNS } = await import("@/lib/review/audit-query");
const h = await import("../sheets/helpers");
const b = await import("../bench/helpers");

const db = () => state.t!.db;
type Actor = Awaited<ReturnType<typeof h.actorOf>>;
let rhea: Actor, ines: Actor, admin: Actor;
let job141: string, job143: string;

interface AuditBody {
  entries: Array<{
    id: number;
    at: string;
    actorId: string | null;
    actorName: string | null;
    action: string;
    jobId: string | null;
    jobNumber: string | null;
    words: string;
    changes: string[];
  }>;
  total: number;
  pageSize: number;
  nextBefore: number | null;
  timeZone: string;
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
/** The calendar day of a moment in a time zone, as YYYY-MM-DD. */
const dayIn = (iso: string, timeZone: string) => new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" }).format(new Date(iso));
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

  it("lists newest first, in words, 50 to a page, and walks every page by keyset", async () => {
    signInAs(admin);
    const all = await get("");
    expect(all.status).toBe(200);
    expect(all.body.pageSize).toBe(50);
    const ids = all.body.entries.map((e) => e.id);
    expect(ids).toEqual([...ids].sort((x, y) => y - x));
    expect(all.body.entries[0]).toMatchObject({
      action: "job.sent_back",
      actorName: "Rhea Castellan",
      jobNumber: "MHW-0143",
      words: "Rhea Castellan sent MHW-0143 back to the bench",
      changes: ["status: Awaiting audit → At the bench", "comment: — → 'Deck flatness missing'"],
    });
    expect(all.body.entries[1]).toMatchObject({ words: "Rhea Castellan approved seat 1I1 on MHW-0141" });
    // 130 more entries that make no burst (two kinds in turn), so the trail runs to several pages.
    await db()
      .insert(auditEntries)
      .values(
        Array.from({ length: 130 }, (_, i) => ({
          at: new Date(Date.parse("2026-01-10T08:00:00.000Z") + i * 1000),
          actorId: ines.id,
          action: i % 2 ? "job.edited" : "session.ended",
          entityType: "job",
          entityId: job141,
          jobId: job141,
        })),
      );
    // Every entry once, following "Older" to the end.
    const seen: number[] = [];
    let before: number | null = null;
    for (let guard = 0; guard < 100; guard++) {
      const page = await get(before ? `?before=${before}` : "");
      seen.push(...page.body.entries.map((e) => e.id));
      before = page.body.nextBefore;
      if (!before) break;
    }
    const total = (await get("")).body.total;
    expect(total).toBe(all.body.total + 130);
    expect(seen.length).toBe(total);
    expect(new Set(seen).size).toBe(seen.length);
    expect(seen).toEqual([...seen].sort((x, y) => y - x));
    const beyond = await get(`?before=${Math.min(...seen)}`);
    expect(beyond.body).toMatchObject({ entries: [], nextBefore: null });
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

    // The day is taken from the entry itself in the shop's zone, so the test holds across midnight.
    const day = dayIn(both.body.entries[0]!.at, both.body.timeZone);
    expect((await get(`?person=${rhea.id}&from=${day}&to=${day}`)).body.total).toBe(2);
    expect((await get(`?person=${rhea.id}&from=${shiftDay(day, 1)}`)).body.total).toBe(0);
    expect((await get(`?person=${rhea.id}&to=${shiftDay(day, -1)}`)).body.total).toBe(0);
  });

  it("refuses bad filters with 400, a sentence and field messages", async () => {
    signInAs(rhea);
    const bad = await get("?job=not-a-job&from=14/03/2026");
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.fieldErrors ?? {}).sort()).toEqual(["from", "job"]);
    expect(bad.body.message).toMatch(/^The audit trail's filters are not valid: .+\.$/);
    const reversed = await get("?from=2026-03-14&to=2026-03-01");
    expect(reversed).toMatchObject({ status: 400, body: { fieldErrors: { to: ["The start date is after the end date."] } } });
    const cursor = await get("?before=-3");
    expect(cursor).toMatchObject({ status: 400, body: { fieldErrors: { before: [expect.stringMatching(/Older link/)] } } });
  });
});

describe("days are the shop's days", () => {
  // 23:30 UTC on 30 June is 00:30 on 1 July in London (BST, UTC+1): a 1 July entry there.
  const lateJune = new Date("2026-06-30T23:30:00.000Z");
  // 00:30 UTC on 1 December is still 1 December in London (GMT) but 30 November in New York.
  const earlyDecember = new Date("2026-12-01T00:30:00.000Z");
  let ids: number[] = [];

  beforeAll(async () => {
    const rows = await db()
      .insert(auditEntries)
      .values([
        { at: lateJune, actorId: ines.id, action: "job.edited", entityType: "job", entityId: job141, jobId: job141, before: { engine: "A" }, after: { engine: "B" } },
        { at: earlyDecember, actorId: ines.id, action: "job.edited", entityType: "job", entityId: job141, jobId: job141, before: { engine: "B" }, after: { engine: "C" } },
      ])
      .returning({ id: auditEntries.id });
    ids = rows.map((r) => r.id);
  });

  const idsFor = async (query: string) => (await get(`?person=${ines.id}&${query}`)).body.entries.map((e) => e.id).filter((id) => ids.includes(id));

  it("an entry at 00:30 London time on 1 July is in 1 July's filter, not 30 June's", async () => {
    signInAs(rhea);
    expect(await idsFor("from=2026-07-01&to=2026-07-01")).toEqual([ids[0]]);
    expect(await idsFor("from=2026-06-30&to=2026-06-30")).toEqual([]);
    expect(await idsFor("to=2026-06-30")).toEqual([]);
    expect(await idsFor("from=2026-07-01&to=2026-07-31")).toEqual([ids[0]]);
  });

  it("follows the shop's own zone when it changes", async () => {
    signInAs(rhea);
    const [shop] = await db().select().from(shops).where(eq(shops.id, rhea.shopId));
    try {
      await db().update(shops).set({ timeZone: "America/New_York" }).where(eq(shops.id, rhea.shopId));
      expect(await idsFor("from=2026-11-30&to=2026-11-30")).toEqual([ids[1]]);
      expect(await idsFor("from=2026-12-01&to=2026-12-01")).toEqual([]);
      expect((await get("")).body.timeZone).toBe("America/New_York");
    } finally {
      await db().update(shops).set({ timeZone: shop!.timeZone }).where(eq(shops.id, rhea.shopId));
    }
    expect(await idsFor("from=2026-12-01&to=2026-12-01")).toEqual([ids[1]]);
  });
});

describe("pages end at the end of a burst", () => {
  it("a burst across the page size stays on one page, and the next page starts after it", async () => {
    const t0 = Date.parse("2026-11-20T10:00:00.000Z");
    // Eight approvals by the supervisor on MHW-0143, 5 s apart, then an older lone entry.
    await db().insert(auditEntries).values({ at: new Date(t0 - 3_600_000), actorId: ines.id, action: "job.status_changed", entityType: "job", entityId: job143, jobId: job143, before: { status: "queued" }, after: { status: "at_bench" } });
    await db()
      .insert(auditEntries)
      .values(Array.from({ length: 8 }, (_, i) => ({ at: new Date(t0 + i * 5000), actorId: rhea.id, action: "seat.approved", entityType: "seat", entityId: `not-a-seat-${i}`, jobId: job143 })));
    const filter = { job: job143, from: "2026-11-20", to: "2026-11-20" };
    const first = await listAuditEntries(db(), rhea.shopId, filter, 5);
    expect(first.entries.map((e) => e.action)).toEqual(Array(8).fill("seat.approved"));
    expect(first.total).toBe(9);
    expect(first.nextBefore).toBe(first.entries.at(-1)!.id);
    const second = await listAuditEntries(db(), rhea.shopId, { ...filter, before: first.nextBefore! }, 5);
    expect(second.entries.map((e) => e.action)).toEqual(["job.status_changed"]);
    expect(second.nextBefore).toBeNull();
  });
});

describe("GET /api/audit/csv", () => {
  const getCsv = async (query: string) => {
    const res = await csvRoute.GET(new NextRequest(`${b.BASE_URL}/api/audit/csv${query}`), {});
    return { status: res.status, headers: res.headers, text: await res.text() };
  };

  it("holds the filtered entries in words, with the raw action code and the ISO time", async () => {
    signInAs(rhea);
    const res = await getCsv(`?person=${rhea.id}&job=${job141}`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("text/csv; charset=utf-8");
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="audit-trail-\d{4}-\d{2}-\d{2}\.csv"$/);
    const parsed = Papa.parse<Record<string, string>>(res.text.replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual([...AUDIT_CSV_COLUMNS]);
    expect(parsed.data).toHaveLength(1);
    const row = parsed.data[0]!;
    expect(row).toMatchObject({
      person: "Rhea Castellan",
      entry: "Rhea Castellan approved seat 1I1 on MHW-0141",
      job: "MHW-0141",
      seat: "1I1",
      action: "seat.approved",
    });
    expect(row.changes).toContain("comment: — → 'Band even'");
    expect(row.changes).toContain("state: Settled → Approved");
    expect(new Date(row.at_iso!).toISOString()).toBe(row.at_iso);
    expect(row.when).toMatch(/^\d{1,2} [A-Z][a-z]{2} \d{4}, \d{2}:\d{2}:\d{2} /);
    expect(res.text).not.toMatch(/[{}]/);
  });

  it("exports every filtered entry, not one page", async () => {
    signInAs(admin);
    const all = await get("");
    const res = await getCsv("");
    const parsed = Papa.parse<Record<string, string>>(res.text.replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: true });
    expect(parsed.data.length).toBe(all.body.total);
    expect(all.body.total).toBeGreaterThan(50);
    expect(parsed.data.map((r) => Number(r.entry_id))).toEqual(parsed.data.map((r) => Number(r.entry_id)).sort((x, y) => y - x));
  });

  it("keeps a comment that starts like a formula as text", async () => {
    signInAs(rhea);
    await db().insert(auditEntries).values({ actorId: rhea.id, action: "job.sent_back", entityType: "job", entityId: job143, jobId: job143, before: { status: "awaiting_audit" }, after: { status: "at_bench", comment: "=HYPERLINK(1)" } });
    const res = await getCsv(`?job=${job143}`);
    const parsed = Papa.parse<Record<string, string>>(res.text.replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: true });
    const row = parsed.data.find((r) => r.changes?.includes("HYPERLINK"))!;
    // The diff puts the comment after its label; the cell itself never starts with "=".
    expect(row.changes!.startsWith("=")).toBe(false);
    expect(parsed.data.every((r) => Object.values(r).every((v) => !/^[=+\-@]/.test(v ?? "")))).toBe(true);
  });

  it("refuses bad dates and a bad job id with 400 and a sentence; technicians get 403", async () => {
    signInAs(rhea);
    for (const [query, field] of [
      ["?from=2026-02-31", "from"],
      ["?to=yesterday", "to"],
      ["?job=MHW-0141", "job"],
    ] as const) {
      const res = await getCsv(query);
      expect(res.status, query).toBe(400);
      const body = JSON.parse(res.text) as { error: string; message: string; fieldErrors: Record<string, string[]> };
      expect(body.error).toBe("bad_request");
      expect(body.message).toMatch(/^The audit trail's filters are not valid: .+\.$/);
      expect(Object.keys(body.fieldErrors)).toEqual([field]);
    }
    signInAs(ines);
    expect((await getCsv("")).status).toBe(403);
  });
});
