// Group commit of stroke saves (lib/bench/stroke-batch.ts). The property that matters: a batch
// of saves ends exactly as the same saves one after another would — the same answers and
// refusals, the same strokes stored, the same seat states, valves and audit entries. Two
// identical heads on one database: one gets the saves one at a time, its twin the same saves in
// batches of random sizes, and the two records are compared.
import { randomUUID } from "node:crypto";
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";
import { auditEntries, customers, jobs, lappingSessions, shops, strokes, valves, type LappingStage } from "@/db/schema";
import { seedDemoShop } from "@/db/seed";
import { SEAT_HOLD_REFRESH_SECONDS } from "@/lib/bench/rules";
import { getSeatReport } from "@/lib/bench/service";
import { saveStrokeBatch, type StrokeSave, type StrokeSaveOutcome } from "@/lib/strokes/batch";
import { StrokeSaveQueue } from "@/lib/strokes/queue";
import { AppError } from "@/lib/errors";
import { seatCode } from "@/lib/heads/layout";
import { createHeadWithSeats } from "@/lib/heads/create";
import type { StrokeInput } from "@/lib/validations/bench";
import { freshPglite, freshServerDatabase, serverUrl, type TestDatabase } from "../helpers/db";
import { syntheticStroke } from "../helpers/strokes";
import { userIds } from "./helpers";

const INES = "ines@millrace.example";
const DOV = "dov@millrace.example";
const RHEA = "rhea@millrace.example";
const ADMIN = "admin@millrace.example";

let t: TestDatabase;
let people: Map<string, string>;

/** A small seeded generator (mulberry32), so a failure can be replayed. */
function prng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let x = Math.imul(a ^ (a >>> 15), 1 | a);
    x = (x + Math.imul(x ^ (x >>> 7), 61 | x)) ^ x;
    return ((x ^ (x >>> 14)) >>> 0) / 4294967296;
  };
}

interface Twin {
  jobId: string;
  jobNumber: string;
  /** Seat code → [coarse session, fine session], started by Ines. */
  sessions: Map<string, Record<LappingStage, string>>;
  seatIds: Map<string, string>;
}

/** A job at the bench assigned to nobody, one 8-seat head, a coarse and a fine session on each seat. */
async function twin(db: Db, number: string): Promise<Twin> {
  const [shop] = await db.select().from(shops).limit(1);
  const [customer] = await db.select().from(customers).where(eq(customers.shopId, shop!.id)).limit(1);
  const [job] = await db
    .insert(jobs)
    .values({ shopId: shop!.id, number, customerId: customer!.id, engineDescription: "Twin test head", status: "at_bench" })
    .returning();
  const head = await createHeadWithSeats(db, job!.id, "Head", {
    arrangement: "inline",
    cylinderCount: 2,
    intakeValvesPerCylinder: 2,
    exhaustValvesPerCylinder: 2,
    camshaftCount: 1,
    journalsPerCamshaft: 3,
  });
  const sessions = new Map<string, Record<LappingStage, string>>();
  const seatIds = new Map<string, string>();
  let minute = 0;
  for (const seat of head.seats) {
    const pair = { coarse: randomUUID(), fine: randomUUID() };
    // Fixed start times, the same on both twins: the verdict reads sessions in start order.
    for (const stage of ["coarse", "fine"] as const) {
      await db.insert(lappingSessions).values({
        id: pair[stage],
        seatId: seat.id,
        technicianId: people.get(INES)!,
        stage,
        deviceId: "twin-phone-1",
        startedAt: new Date(Date.UTC(2026, 10, 2, 8, minute++)),
      });
    }
    sessions.set(seatCode(seat), pair);
    seatIds.set(seatCode(seat), seat.id);
  }
  return { jobId: job!.id, jobNumber: number, sessions, seatIds };
}

/** One step of the script: who sends which strokes to which session (by seat code and stage). */
interface Step {
  who: string;
  seat: string | null; // null: a session that does not exist
  stage: LappingStage;
  strokes: StrokeInput[];
}

/**
 * A morning at the bench, made up: mostly Ines lapping (coarse strokes fading, then fine), with
 * resends of strokes already sent, a batch carrying a stroke twice, Dov trying to add to Ines's
 * session, the admin trying to record work, the supervisor adding, and sessions that do not exist.
 */
function script(seed: number, seats: string[], length: number): Step[] {
  const rand = prng(seed);
  const sent: Array<{ seat: string; stage: LappingStage; stroke: StrokeInput }> = [];
  const counters = new Map<string, number>();
  const steps: Step[] = [];
  const pick = <T,>(xs: T[]) => xs[Math.floor(rand() * xs.length)]!;
  for (let i = 0; i < length; i++) {
    const r = rand();
    const seat = pick(seats);
    const stage: LappingStage = rand() < 0.3 ? "fine" : "coarse";
    const fresh = (n: number, key = `${seat}/${stage}`): StrokeInput[] =>
      Array.from({ length: n }, () => {
        const index = (counters.get(key) ?? 0) + 1;
        counters.set(key, index);
        const fade = key.endsWith("/coarse") ? 0.5 + 11 * Math.exp(-(index - 1) / 6) : 0.3 + 3 * Math.exp(-(index - 1) / 4);
        const contrastDb = Math.round((fade + (rand() - 0.5) * 0.4) * 100) / 100;
        const stroke: StrokeInput = { ...syntheticStroke(index, contrastDb), flags: rand() < 0.05 ? ["too-quiet"] : [] };
        const [toSeat, toStage] = key.split("/") as [string, LappingStage];
        sent.push({ seat: toSeat, stage: toStage, stroke });
        return stroke;
      });
    if (r < 0.06) steps.push({ who: DOV, seat, stage, strokes: fresh(1) });
    else if (r < 0.09) steps.push({ who: ADMIN, seat, stage, strokes: fresh(1) });
    else if (r < 0.12) steps.push({ who: INES, seat: null, stage, strokes: fresh(1) });
    else if (r < 0.16 && sent.length > 0) {
      const old = pick(sent);
      steps.push({ who: INES, seat: old.seat, stage: old.stage, strokes: [old.stroke] });
    } else if (r < 0.2 && sent.length > 0) {
      const old = pick(sent);
      steps.push({ who: INES, seat: old.seat, stage: old.stage, strokes: [old.stroke, ...fresh(1, `${old.seat}/${old.stage}`)] });
    } else if (r < 0.24) {
      const [s] = fresh(1);
      steps.push({ who: INES, seat, stage, strokes: [s!, s!] });
    } else if (r < 0.3) steps.push({ who: RHEA, seat, stage, strokes: fresh(1 + Math.floor(rand() * 2)) });
    else steps.push({ who: INES, seat, stage, strokes: fresh(1 + Math.floor(rand() * 3)) });
  }
  return steps;
}

function saveFor(tw: Twin, step: Step): StrokeSave {
  return {
    userId: people.get(step.who)!,
    sessionId: step.seat ? tw.sessions.get(step.seat)![step.stage] : randomUUID(),
    strokes: step.strokes,
  };
}

/** An outcome with the job's number taken out of messages, so the twins' answers compare. */
function comparable(o: StrokeSaveOutcome, tw: Twin) {
  if (o.ok) return { ok: true, ...o.result };
  const e = o.error;
  if (!(e instanceof AppError)) throw e;
  return { ok: false, status: e.status, message: e.message.replaceAll(tw.jobNumber, "<job>") };
}

/** The twin's record: strokes per session, seat states, valves, and the state changes in order. */
async function record(db: Db, tw: Twin) {
  const out: Record<string, unknown> = {};
  for (const [code, pair] of tw.sessions) {
    const seatId = tw.seatIds.get(code)!;
    const count = async (sessionId: string) =>
      (await db.select({ n: sql<number>`count(*)::int` }).from(strokes).where(eq(strokes.sessionId, sessionId)))[0]!.n;
    const [valve] = await db.select({ lapped: valves.lappedInSeatId }).from(valves).where(eq(valves.seatId, seatId));
    const changes = await db
      .select({ before: auditEntries.before, after: auditEntries.after })
      .from(auditEntries)
      .where(and(eq(auditEntries.entityId, seatId), eq(auditEntries.action, "seat.state_changed")))
      .orderBy(asc(auditEntries.id));
    const [seat] = await db.execute<{ state: string }>(sql`select state from seats where id = ${seatId}`).then((r: unknown) => ((r as { rows?: unknown }).rows ?? r) as Array<{ state: string }>);
    out[code] = {
      coarse: await count(pair.coarse),
      fine: await count(pair.fine),
      state: seat!.state,
      valveLapped: valve!.lapped === seatId,
      changes,
    };
  }
  return out;
}

const server = serverUrl();
const backends: Array<[string, () => Promise<TestDatabase>]> = [
  ["PGlite", () => freshPglite()],
  // As the production server runs it: every statement reaches the database thread.
  ["PGlite on a thread of its own", () => freshPglite({ thread: true })],
];
if (server) backends.push(["PostgreSQL server", () => freshServerDatabase(server)]);

/** Saves sent together, written as one batch. */
function writeBatch(db: Db, batch: StrokeSave[]): Promise<StrokeSaveOutcome[]> {
  return saveStrokeBatch(db, batch);
}

describe.each(backends)("a batch of stroke saves on %s", (_name, open) => {
  beforeAll(async () => {
    t = await open();
    await seedDemoShop(t.db);
    people = await userIds(t.db);
  });
  afterAll(async () => {
    await t?.cleanup();
  });

  it.each([11, 29, 47])("ends exactly as the same saves one at a time (script %i)", async (seed) => {
    const one = await twin(t.db, `TWIN-${seed}-A`);
    const many = await twin(t.db, `TWIN-${seed}-B`);
    const steps = script(seed, [...one.sessions.keys()], 160);

    const serial = [];
    for (const step of steps) {
      const [o] = await saveStrokeBatch(t.db, [saveFor(one, step)]);
      serial.push(comparable(o!, one));
    }

    const rand = prng(seed * 7 + 1);
    const batched: Array<ReturnType<typeof comparable>> = [];
    let sizes = 0;
    for (let at = 0; at < steps.length; ) {
      const size = 1 + Math.floor(rand() * 24);
      const chunk = steps.slice(at, at + size);
      const outcomes = await writeBatch(t.db, chunk.map((s) => saveFor(many, s)));
      expect(outcomes).toHaveLength(chunk.length);
      batched.push(...outcomes.map((o) => comparable(o, many)));
      at += size;
      sizes++;
    }
    expect(sizes).toBeLessThan(steps.length / 4);

    expect(batched).toEqual(serial);
    // The script reaches every kind of answer, so the comparison covers each of them.
    const statuses = new Set(serial.map((o) => ("status" in o ? o.status : o.accepted > 0 ? 201 : 200)));
    expect([...statuses].sort()).toEqual([200, 201, 403, 404]);
    expect(serial.some((o) => "duplicates" in o && o.duplicates! > 0 && o.accepted! > 0)).toBe(true);
    expect(await record(t.db, many)).toEqual(await record(t.db, one));
    // Independently of both: each stage's last answered verdict is what the seat's report judges
    // from its strokes read one row at a time.
    const rhea = { id: people.get(RHEA)!, shopId: (await t.db.select().from(shops).limit(1))[0]!.id, name: "Rhea", email: RHEA, role: "supervisor" as const };
    for (const [code, seatId] of many.seatIds) {
      const report = await getSeatReport(t.db, rhea, seatId);
      for (const stage of ["coarse", "fine"] as const) {
        const last = steps.map((st, i) => ({ st, o: batched[i]! })).filter(({ st, o }) => st.seat === code && st.stage === stage && o.ok).pop();
        if (last) expect((last.o as { verdict: unknown }).verdict).toEqual(report.stages[stage].verdict);
      }
    }
    // And the seats did move: the record being compared is not empty.
    const changed = Object.values(await record(t.db, one)).filter((r) => (r as { changes: unknown[] }).changes.length > 0);
    expect(changed.length).toBeGreaterThan(4);
  });

  it(`writes a session's sign of life again only when it is older than ${SEAT_HOLD_REFRESH_SECONDS} s`, async () => {
    const tw = await twin(t.db, "TWIN-SEEN");
    const sessionId = [...tw.sessions.values()][0]!.coarse;
    const seen = async () => (await t.db.select({ at: lappingSessions.lastSeenAt }).from(lappingSessions).where(eq(lappingSessions.id, sessionId)))[0]!.at.getTime();
    const setSeen = (secondsAgo: number) =>
      t.db.update(lappingSessions).set({ lastSeenAt: new Date(Date.now() - secondsAgo * 1000) }).where(eq(lappingSessions.id, sessionId));
    const save = async (index: number) => {
      const [o] = await saveStrokeBatch(t.db, [{ userId: people.get(INES)!, sessionId, strokes: [syntheticStroke(index, 8)] }]);
      expect(o!.ok).toBe(true);
    };
    await setSeen(SEAT_HOLD_REFRESH_SECONDS - 2);
    const fresh = await seen();
    await save(1);
    expect(await seen()).toBe(fresh);
    await setSeen(SEAT_HOLD_REFRESH_SECONDS + 2);
    const before = Date.now();
    await save(2);
    expect(await seen()).toBeGreaterThanOrEqual(before - 5);
  });

  it("keeps the other saves when one save's strokes are refused by the database", async () => {
    const tw = await twin(t.db, "TWIN-BAD");
    const [code] = [...tw.sessions.keys()];
    const good = (index: number): StrokeInput => syntheticStroke(index, 10);
    // Past validation (the route's schema would refuse it), the table's own check refuses it.
    const bad: StrokeInput = { ...good(2), contrastDb: 99 };
    const saves = [good(1), bad, good(3)].map((s) => ({ userId: people.get(INES)!, sessionId: tw.sessions.get(code!)!.coarse, strokes: [s] }));
    const outcomes = await writeBatch(t.db, saves);
    expect(outcomes.map((o) => o.ok)).toEqual([true, false, true]);
    const stored = await t.db
      .select({ index: strokes.index })
      .from(strokes)
      .where(inArray(strokes.sessionId, [tw.sessions.get(code!)!.coarse]))
      .orderBy(asc(strokes.index));
    expect(stored.map((s) => s.index)).toEqual([1, 3]);
  });
});

describe("the save queue", () => {
  it("writes a lone save at once and gathers saves that arrive while a batch is written", async () => {
    const batches: number[] = [];
    let release: () => void = () => {};
    const queue = new StrokeSaveQueue(async (batch) => {
      batches.push(batch.length);
      if (batches.length === 1) await new Promise<void>((r) => (release = r));
      return batch.map((s) => ({ ok: true as const, result: { accepted: s.strokes.length, duplicates: 0, seatState: "lapping" as const, verdict: { state: "listening" } as never, strokeCount: 1 } }));
    });
    const save = (n: number): StrokeSave => ({ userId: "u", sessionId: `s${n}`, strokes: [] });
    const first = queue.submit(save(0));
    await new Promise((r) => setImmediate(r));
    expect(batches).toEqual([1]);
    const rest = [1, 2, 3, 4, 5].map((n) => queue.submit(save(n)));
    await new Promise((r) => setImmediate(r));
    expect(batches).toEqual([1]);
    release();
    await Promise.all([first, ...rest]);
    expect(batches).toEqual([1, 5]);
  });

  it("answers each save with its own outcome, and fails a batch's saves when the write fails", async () => {
    const queue = new StrokeSaveQueue(async (batch) =>
      batch.map((s) => (s.sessionId === "bad" ? { ok: false as const, error: new Error("refused") } : { ok: true as const, result: { accepted: 1 } as never })),
    );
    const save = (id: string): StrokeSave => ({ userId: "u", sessionId: id, strokes: [] });
    const [a, b] = await Promise.allSettled([queue.submit(save("good")), queue.submit(save("bad"))]);
    expect(a).toEqual({ status: "fulfilled", value: { accepted: 1 } });
    expect(b.status).toBe("rejected");

    let calls = 0;
    const flaky = new StrokeSaveQueue(async (batch) => {
      if (calls++ === 0) throw new Error("database gone");
      return batch.map(() => ({ ok: true as const, result: { accepted: 2 } as never }));
    });
    await expect(flaky.submit(save("x"))).rejects.toThrow("database gone");
    // The queue keeps working after a failed batch.
    await expect(flaky.submit(save("y"))).resolves.toEqual({ accepted: 2 });
  });

  it("splits a queue that holds more strokes than one statement may carry", async () => {
    const sizes: number[] = [];
    const queue = new StrokeSaveQueue(
      async (batch) => {
        sizes.push(batch.reduce((n, s) => n + s.strokes.length, 0));
        return batch.map(() => ({ ok: true as const, result: {} as never }));
      },
      1,
      10,
    );
    const save = (n: number): StrokeSave => ({ userId: "u", sessionId: "s", strokes: Array.from({ length: n }, () => ({}) as StrokeInput) });
    await Promise.all([4, 4, 4, 12, 1].map((n) => queue.submit(save(n))));
    expect(sizes).toEqual([8, 4, 12, 1]);
  });
});
