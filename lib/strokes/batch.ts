// Writing a batch of stroke saves: one transaction, one statement per step for the whole batch.
// The outcome of every save is exactly what it would have been had the saves run one after
// another in arrival order (tests/bench/stroke-batch.test.ts checks this): the same checks and
// refusals, the same strokes kept or counted as duplicates, the same verdict and seat state as of
// that save, and one audit entry per seat state change.
//
// writeBatch reads top-down, one named step each:
//   readWhoAndWhere → authoriseSaves → insertStrokes → markValvesLappedIn → readCurves → judgeSaves → recordChanges
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { heads, jobs, lappingSessions, seats, strokes, users, valves, type LappingStage, type SeatState } from "@/db/schema";
import type { SeatVerdict } from "@/lib/audio";
import { actorColumns, actorFromRow, authorize, type Actor } from "@/lib/auth/authorize";
import { assertCanWorkOn } from "@/lib/auth/job-access";
import { recordAudit } from "@/lib/audit";
import { assertOpenForWork, assertOwnSession, judgeStage, SEAT_HOLD_REFRESH_SECONDS, SESSION_NOT_FOUND, seatStateFor, STROKE_ORDER_COLUMNS } from "@/lib/bench/rules";
import { NotFoundError } from "@/lib/errors";
import { seatCode } from "@/lib/heads/layout";
import { backToBenchForWork } from "@/lib/jobs/hand-in";
import type { StrokeInput } from "@/lib/validations/bench";

export interface StrokeSaveResult {
  accepted: number;
  duplicates: number;
  seatState: SeatState;
  verdict: SeatVerdict;
  strokeCount: number;
}

/** One stroke save: who signed in (their id, from the session token), which session, what strokes. */
export interface StrokeSave {
  userId: string;
  /** The session token's version; the save is refused as signed out when the account's has moved on. Undefined: not checked. */
  sessionVersion?: number;
  sessionId: string;
  strokes: StrokeInput[];
}

export type StrokeSaveOutcome = { ok: true; result: StrokeSaveResult } | { ok: false; error: unknown };

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** A save's session, with its seat (locked) and job, as the checks read them. */
interface Target {
  sessionId: string;
  session: { stage: LappingStage; technicianId: string; lastSeenAt: Date };
  starterName: string;
  seat: { id: string; state: SeatState; cylinder: number; kind: (typeof seats.$inferSelect)["kind"]; position: number };
  job: { id: string; shopId: string; number: string; status: (typeof jobs.$inferSelect)["status"]; assignedTechnicianId: string | null };
  valveId: string | null;
  valveLappedIn: string | null;
}

interface Accepted {
  save: StrokeSave;
  /** The save's place in the batch. */
  at: number;
  actor: Actor;
  target: Target;
}

/** One stroke of a touched seat, in the order the verdict reads them. */
interface CurvePoint {
  stage: LappingStage;
  startS: number;
  contrastDb: number;
  flags: string[];
  /** The accepted save that stored it in this batch; undefined for a stroke stored before. */
  by: number | undefined;
}

/**
 * Saves strokes idempotently (a resend with the same clientId is ignored) and re-judges the seat.
 * The actor is read again from the users table, as for every save.
 */
export async function saveStrokes(db: Db, actor: Actor, sessionId: string, input: StrokeInput[]): Promise<StrokeSaveResult> {
  const [outcome] = await saveStrokeBatch(db, [{ userId: actor.id, sessionId, strokes: input }]);
  if (!outcome!.ok) throw outcome!.error;
  return outcome!.result;
}

/**
 * Saves a batch as one transaction. A refusal (not signed in, not allowed, not found, signed off)
 * belongs to its own save and leaves the others alone. If the database refuses the batch as a
 * whole, each save is run on its own, so that one bad save cannot fail the rest.
 */
export async function saveStrokeBatch(db: Db, given: StrokeSave[]): Promise<StrokeSaveOutcome[]> {
  if (given.length === 0) return [];
  // Ids are matched against the database's answers, which are in lower case.
  const batch = given.map((s) => ({ ...s, userId: s.userId.toLowerCase(), sessionId: s.sessionId.toLowerCase() }));
  try {
    return await db.transaction((tx) => writeBatch(tx, batch));
  } catch (err) {
    if (batch.length === 1) return [{ ok: false, error: err }];
    const outcomes: StrokeSaveOutcome[] = [];
    for (const save of batch) outcomes.push(...(await saveStrokeBatch(db, [save])));
    return outcomes;
  }
}

async function writeBatch(tx: Tx, batch: StrokeSave[]): Promise<StrokeSaveOutcome[]> {
  const outcomes: Array<StrokeSaveOutcome | null> = batch.map(() => null);
  const { people, targets } = await readWhoAndWhere(tx, batch);
  const accepted = authoriseSaves(batch, people, targets, outcomes);
  if (accepted.length === 0) return outcomes as StrokeSaveOutcome[];
  const { insertedIds, acceptedCount, storerOf } = await insertStrokes(tx, accepted);
  await markValvesLappedIn(tx, accepted, acceptedCount);
  const curves = await readCurves(tx, accepted, insertedIds, storerOf);
  const changes = judgeSaves(accepted, curves, acceptedCount, outcomes);
  await recordChanges(tx, changes, accepted, acceptedCount);
  return outcomes as StrokeSaveOutcome[];
}

type Person = Actor & { active: boolean; sessionVersion: number };

/**
 * The people signed in, and the sessions with their seats locked in seat order: two batches (on
 * a PostgreSQL server, from two processes) always lock shared seats in the same order.
 */
async function readWhoAndWhere(tx: Tx, batch: StrokeSave[]): Promise<{ people: Map<string, Person>; targets: Map<string, Target> }> {
  const userIds = [...new Set(batch.map((s) => s.userId))];
  const sessionIds = [...new Set(batch.map((s) => s.sessionId))];
  const peopleRows = await tx.select(actorColumns).from(users).where(inArray(users.id, userIds));
  const rows = await tx
    .select({
      sessionId: lappingSessions.id,
      stage: lappingSessions.stage,
      technicianId: lappingSessions.technicianId,
      lastSeenAt: lappingSessions.lastSeenAt,
      starterName: users.name,
      seatId: seats.id,
      seatState: seats.state,
      cylinder: seats.cylinder,
      kind: seats.kind,
      position: seats.position,
      jobId: jobs.id,
      shopId: jobs.shopId,
      number: jobs.number,
      status: jobs.status,
      assignedTechnicianId: jobs.assignedTechnicianId,
      valveId: valves.id,
      valveLappedIn: valves.lappedInSeatId,
    })
    .from(lappingSessions)
    .innerJoin(users, eq(users.id, lappingSessions.technicianId))
    .innerJoin(seats, eq(seats.id, lappingSessions.seatId))
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .leftJoin(valves, eq(valves.seatId, seats.id))
    .where(inArray(lappingSessions.id, sessionIds))
    .orderBy(seats.id)
    .for("update", { of: seats });
  const targets = new Map<string, Target>(
    rows.map((r) => [
      r.sessionId,
      {
        sessionId: r.sessionId,
        session: { stage: r.stage, technicianId: r.technicianId, lastSeenAt: r.lastSeenAt },
        starterName: r.starterName,
        seat: { id: r.seatId, state: r.seatState, cylinder: r.cylinder, kind: r.kind, position: r.position },
        job: { id: r.jobId, shopId: r.shopId, number: r.number, status: r.status, assignedTechnicianId: r.assignedTechnicianId },
        valveId: r.valveId,
        valveLappedIn: r.valveLappedIn,
      },
    ]),
  );
  return { people: new Map(peopleRows.map((p) => [p.id, p])), targets };
}

/** The same checks, in the same order, as a save on its own; a refused save gets its outcome here. */
function authoriseSaves(batch: StrokeSave[], people: Map<string, Person>, targets: Map<string, Target>, outcomes: Array<StrokeSaveOutcome | null>): Accepted[] {
  const accepted: Accepted[] = [];
  batch.forEach((save, at) => {
    try {
      const actor = authorize(actorFromRow(people.get(save.userId), save.sessionVersion), "jobs:work");
      const target = targets.get(save.sessionId);
      if (!target || target.job.shopId !== actor.shopId) throw new NotFoundError(SESSION_NOT_FOUND);
      assertCanWorkOn(actor, target.job);
      assertOwnSession(actor, target.session, target.starterName);
      assertOpenForWork(target);
      accepted.push({ save, at, actor, target });
    } catch (err) {
      outcomes[at] = { ok: false, error: err };
    }
  });
  return accepted;
}

/**
 * One insert for every stroke of the batch; a stroke already stored (or sent twice in this batch)
 * under its session and clientId is skipped, as on its own. The sessions' last sign of life is
 * refreshed where it is older than the refresh interval (read under the seats' lock, so current).
 */
async function insertStrokes(tx: Tx, accepted: Accepted[]): Promise<{ insertedIds: string[]; acceptedCount: number[]; storerOf: number[] }> {
  const now = new Date();
  const staleBefore = now.getTime() - SEAT_HOLD_REFRESH_SECONDS * 1000;
  const stale = [...new Set(accepted.filter((a) => a.target.session.lastSeenAt.getTime() < staleBefore).map((a) => a.save.sessionId))];
  if (stale.length > 0) await tx.update(lappingSessions).set({ lastSeenAt: now }).where(inArray(lappingSessions.id, stale));

  const rows = accepted.flatMap(({ save }) =>
    save.strokes.map((s) => ({
      sessionId: save.sessionId,
      clientId: s.clientId,
      index: s.index,
      startS: s.startS,
      endS: s.endS,
      onsetDb: s.onsetDb,
      bodyDb: s.bodyDb,
      contrastDb: s.contrastDb,
      bandSnrDb: s.bandSnrDb ?? null,
      flags: s.flags,
    })),
  );
  const inserted = await tx
    .insert(strokes)
    .values(rows)
    .onConflictDoNothing({ target: [strokes.sessionId, strokes.clientId] })
    .returning({ id: strokes.id, sessionId: strokes.sessionId, clientId: strokes.clientId });

  // Which save stored each new stroke: the first one in arrival order that carried it.
  const firstCarrier = new Map<string, number>();
  accepted.forEach(({ save }, k) => {
    for (const s of save.strokes) {
      const key = `${save.sessionId}/${s.clientId.toLowerCase()}`;
      if (!firstCarrier.has(key)) firstCarrier.set(key, k);
    }
  });
  const storerOf = inserted.map((row) => firstCarrier.get(`${row.sessionId}/${row.clientId}`)!);
  const acceptedCount = accepted.map(() => 0);
  for (const k of storerOf) acceptedCount[k]!++;
  return { insertedIds: inserted.map((r) => r.id), acceptedCount, storerOf };
}

/** The valve in a seat is lapped into it by the seat's first stored stroke, and stays with it. */
async function markValvesLappedIn(tx: Tx, accepted: Accepted[], acceptedCount: number[]): Promise<void> {
  const lappedSeats = new Set<string>();
  accepted.forEach(({ target }, k) => {
    if (acceptedCount[k]! > 0 && target.valveId && target.valveLappedIn === null) lappedSeats.add(target.seat.id);
  });
  if (lappedSeats.size === 0) return;
  await tx
    .update(valves)
    .set({ lappedInSeatId: valves.seatId, updatedAt: new Date() })
    .where(and(inArray(valves.seatId, [...lappedSeats]), isNull(valves.lappedInSeatId)));
}

/**
 * Every stroke of the touched seats, in the order the verdict reads them: one row per seat and
 * stage, its strokes as one JSON array (a row per stroke costs the embedded database far more
 * than the statement itself).
 */
async function readCurves(tx: Tx, accepted: Accepted[], insertedIds: string[], storerOf: number[]): Promise<Map<string, CurvePoint[]>> {
  const seatIds = [...new Set(accepted.map((a) => a.target.seat.id))];
  const order = sql.join(
    STROKE_ORDER_COLUMNS.map((c) => sql`${c}`),
    sql`, `,
  );
  const rows = await tx
    .select({
      seatId: lappingSessions.seatId,
      stage: lappingSessions.stage,
      points: sql<Array<[string, number, number, string[]]>>`json_agg(json_build_array(${strokes.id}, ${strokes.startS}, ${strokes.contrastDb}, ${strokes.flags}) order by ${order})`,
    })
    .from(strokes)
    .innerJoin(lappingSessions, eq(lappingSessions.id, strokes.sessionId))
    .where(inArray(lappingSessions.seatId, seatIds))
    .groupBy(lappingSessions.seatId, lappingSessions.stage);
  const placeOf = new Map(insertedIds.map((id, n) => [id, n]));
  const bySeat = new Map<string, CurvePoint[]>();
  for (const row of rows) {
    const list = bySeat.get(row.seatId) ?? [];
    for (const [id, startS, contrastDb, flags] of row.points) {
      const place = placeOf.get(id);
      list.push({ stage: row.stage, startS, contrastDb, flags, by: place === undefined ? undefined : storerOf[place] });
    }
    bySeat.set(row.seatId, list);
  }
  return bySeat;
}

interface StateChange {
  actor: Actor;
  target: Target;
  before: SeatState;
  after: SeatState;
  stage: LappingStage;
  verdict: SeatVerdict;
  count: number;
}

/** Each save's verdict sees the strokes stored before it and its own, as it would on its own. */
function judgeSaves(accepted: Accepted[], curves: Map<string, CurvePoint[]>, acceptedCount: number[], outcomes: Array<StrokeSaveOutcome | null>): { changes: StateChange[]; finalStates: Map<string, SeatState> } {
  const finalStates = new Map<string, SeatState>();
  const changes: StateChange[] = [];
  accepted.forEach(({ save, at, actor, target }, k) => {
    const visible = (curves.get(target.seat.id) ?? []).filter((s) => s.by === undefined || s.by <= k);
    const stage = target.session.stage;
    const currentList = visible.filter((s) => s.stage === stage);
    const current = judgeStage(currentList);
    const fine = stage === "fine" ? current : judgeStage(visible.filter((s) => s.stage === "fine"));
    const before = finalStates.get(target.seat.id) ?? target.seat.state;
    const next = seatStateFor(before, stage, current, fine);
    if (next !== before) {
      finalStates.set(target.seat.id, next);
      changes.push({ actor, target, before, after: next, stage, verdict: current, count: currentList.length });
    }
    outcomes[at] = {
      ok: true,
      result: { accepted: acceptedCount[k]!, duplicates: save.strokes.length - acceptedCount[k]!, seatState: next, verdict: current, strokeCount: currentList.length },
    };
  });
  return { changes, finalStates };
}

/**
 * The seats' new states with one audit entry per change; new strokes on a head awaiting audit put
 * it back at the bench.
 */
async function recordChanges(tx: Tx, { changes, finalStates }: ReturnType<typeof judgeSaves>, accepted: Accepted[], acceptedCount: number[]): Promise<void> {
  for (const [seatId, state] of finalStates) {
    await tx.update(seats).set({ state, updatedAt: new Date() }).where(eq(seats.id, seatId));
  }
  for (const c of changes) {
    await recordAudit(tx, {
      actorId: c.actor.id,
      action: "seat.state_changed",
      entityType: "seat",
      entityId: c.target.seat.id,
      jobId: c.target.job.id,
      before: { state: c.before },
      after: { state: c.after, stage: c.stage, verdict: c.verdict.state, strokes: c.count },
    });
  }
  const backToBench = new Map<string, Accepted>();
  accepted.forEach((a, k) => {
    if (acceptedCount[k]! > 0 && a.target.job.status === "awaiting_audit" && !backToBench.has(a.target.job.id)) backToBench.set(a.target.job.id, a);
  });
  for (const { actor, target } of backToBench.values()) {
    await backToBenchForWork(tx, actor, target.job, `strokes on ${seatCode(target.seat)} (${target.session.stage})`);
  }
}
