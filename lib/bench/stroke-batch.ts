// Group commit for stroke saves. Every phone at the bench posts its strokes as they are heard, so
// saves arrive many at a time; running each in a transaction of its own costs a handful of
// statements per stroke. The queue below gathers the saves that arrive while the database is busy
// and writes them together: one transaction, one statement per step for the whole batch.
//
// The outcome of every save is exactly what it would have been had the saves run one after
// another in arrival order (tests/bench/stroke-batch.test.ts checks this against saveStrokes):
// the same checks and refusals, the same strokes kept or counted as duplicates, the same verdict
// and seat state as of that save, and one audit entry per seat state change.
import { eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { heads, jobs, lappingSessions, seats, strokes, users, valves, type LappingStage, type SeatState } from "@/db/schema";
import type { SeatVerdict } from "@/lib/audio";
import { actorColumns, actorFromRow, authorize, type Actor } from "@/lib/auth/authorize";
import { recordAudit } from "@/lib/audit";
import { NotFoundError } from "@/lib/errors";
import { seatCode } from "@/lib/heads/layout";
import { backToBenchForWork } from "@/lib/jobs/hand-in";
import type { StrokeInput } from "@/lib/validations/bench";
import { assertOpenForWork, assertOwnSession, judgeStage, SEAT_HOLD_REFRESH_SECONDS, SESSION_NOT_FOUND, seatStateFor, STROKE_ORDER_COLUMNS } from "./rules";
import { assertCanWorkOn } from "@/lib/auth/job-access";
import { strokeSubmitterFor } from "@/db/stroke-submitters";
import { FixedStatement, statementsFor, type Statements } from "./statements";

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

/**
 * Saves strokes idempotently (a resend with the same clientId is ignored) and re-judges the seat.
 * The session is read together with its seat, which is locked, so two saves for one seat judge
 * it one after the other and a sign-off that lands first is seen. The actor is read again from
 * the users table, as for every save.
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
  // Ids are matched against the database's answers as text, which are in lower case.
  const batch = given.map((s) => ({ ...s, userId: s.userId.toLowerCase(), sessionId: s.sessionId.toLowerCase() }));
  try {
    const statements = statementsFor(db);
    return await db.transaction((tx) => writeBatch(tx as unknown as Db, batch, statements));
  } catch (err) {
    if (batch.length === 1) return [{ ok: false, error: err }];
    const outcomes: StrokeSaveOutcome[] = [];
    for (const save of batch) outcomes.push(...(await saveStrokeBatch(db, [save])));
    return outcomes;
  }
}

type Context = {
  sessionId: string;
  session: { stage: LappingStage; technicianId: string; lastSeenAt: Date };
  starterName: string;
  seat: { id: string; state: SeatState; cylinder: number; kind: (typeof seats.$inferSelect)["kind"]; position: number };
  job: { id: string; shopId: string; number: string; status: (typeof jobs.$inferSelect)["status"]; assignedTechnicianId: string | null };
  valveId: string | null;
  valveLappedIn: string | null;
};

// The batch's statements. Each has one text whatever the batch, so that it is planned once and
// rendered once (lib/bench/statements.ts): lists go in as one array each.
// The people signed in, with the columns the guard reads them by (actorColumns).
const PEOPLE = new FixedStatement<"userIds">(
  "stroke_people",
  (v) => sql`select ${sql.join(
    Object.entries(actorColumns).map(([name, column]) => sql`${column} as ${sql.identifier(name)}`),
    sql`, `,
  )}
    from ${users} where ${users.id} = any(${v.userIds}::uuid[])`,
);

type ContextRow = {
  session_id: string; stage: LappingStage; technician_id: string; last_seen_at: string | Date; starter_name: string;
  seat_id: string; seat_state: SeatState; cylinder: number; kind: Context["seat"]["kind"]; position: number;
  job_id: string; shop_id: string; number: string; status: Context["job"]["status"]; assigned_technician_id: string | null;
  valve_id: string | null; lapped_in_seat_id: string | null;
};

// The sessions with their seats locked, in seat order: two batches (on a PostgreSQL server, from
// two processes) always lock shared seats in the same order.
const CONTEXTS = new FixedStatement<"sessionIds">(
  "stroke_contexts",
  (v) => sql`select ${lappingSessions.id} as session_id, ${lappingSessions.stage} as stage, ${lappingSessions.technicianId} as technician_id,
      ${lappingSessions.lastSeenAt} as last_seen_at, ${users.name} as starter_name,
      ${seats.id} as seat_id, ${seats.state} as seat_state, ${seats.cylinder} as cylinder, ${seats.kind} as kind, ${seats.position} as position,
      ${jobs.id} as job_id, ${jobs.shopId} as shop_id, ${jobs.number} as number, ${jobs.status} as status, ${jobs.assignedTechnicianId} as assigned_technician_id,
      ${valves.id} as valve_id, ${valves.lappedInSeatId} as lapped_in_seat_id
    from ${lappingSessions}
    inner join ${users} on ${users.id} = ${lappingSessions.technicianId}
    inner join ${seats} on ${seats.id} = ${lappingSessions.seatId}
    inner join ${heads} on ${heads.id} = ${seats.headId}
    inner join ${jobs} on ${jobs.id} = ${heads.jobId}
    left join ${valves} on ${valves.seatId} = ${seats.id}
    where ${lappingSessions.id} = any(${v.sessionIds}::uuid[])
    order by ${seats.id}
    for update of ${seats}`,
);

// One insert for every stroke of the batch; a stroke already stored (or sent twice in this batch)
// under its session and clientId is skipped, as on its own. The values go in as one array per
// column (unnest): on PGlite that is about twice as fast as a VALUES row per stroke.
const INSERT_COLUMNS = [
  strokes.sessionId,
  strokes.clientId,
  strokes.index,
  strokes.startS,
  strokes.endS,
  strokes.onsetDb,
  strokes.bodyDb,
  strokes.contrastDb,
  strokes.bandSnrDb,
  strokes.flags,
];
const INSERT = new FixedStatement<"sessionIds" | "clientIds" | "indexes" | "starts" | "ends" | "onsets" | "bodies" | "contrasts" | "snrs" | "flags">(
  "stroke_insert",
  (v) => sql`
    insert into ${strokes} (${sql.join(INSERT_COLUMNS.map((c) => sql.identifier(c.name)), sql`, `)})
    select s, c, i, st, en, o, b, k, n, coalesce(string_to_array(nullif(f, ''), '|'), '{}')
    from unnest(${v.sessionIds}::uuid[], ${v.clientIds}::uuid[], ${v.indexes}::int[],
      ${v.starts}::real[], ${v.ends}::real[], ${v.onsets}::real[], ${v.bodies}::real[],
      ${v.contrasts}::real[], ${v.snrs}::real[], ${v.flags}::text[]) as u(s, c, i, st, en, o, b, k, n, f)
    on conflict (${sql.identifier(strokes.sessionId.name)}, ${sql.identifier(strokes.clientId.name)}) do nothing
    returning ${sql.identifier(strokes.id.name)}, ${sql.identifier(strokes.sessionId.name)}, ${sql.identifier(strokes.clientId.name)}`,
);

// A session's last sign of life, refreshed.
const SEEN = new FixedStatement<"at" | "sessionIds">(
  "stroke_seen",
  (v) => sql`update ${lappingSessions} set ${sql.identifier(lappingSessions.lastSeenAt.name)} = ${v.at}::timestamptz
    where ${lappingSessions.id} = any(${v.sessionIds}::uuid[])`,
  "nothing",
);

// The valves lapped into their seats by this batch's strokes (each seat's first).
const LAPPED_IN = new FixedStatement<"at" | "seatIds">(
  "stroke_lapped_in",
  (v) => sql`update ${valves} set ${sql.identifier(valves.lappedInSeatId.name)} = ${valves.seatId}, ${sql.identifier(valves.updatedAt.name)} = ${v.at}::timestamptz
    where ${valves.seatId} = any(${v.seatIds}::uuid[]) and ${valves.lappedInSeatId} is null`,
  "nothing",
);

// Every stroke of the touched seats, in the order the verdict reads them: one row per seat and
// stage with the strokes' figures joined into text, because reading a row per stroke costs PGlite
// far more than the statement itself. A float's text is what the row would have carried, so the
// numbers are the same. `by` is the stroke's place among the strokes this batch stored (0 for one
// stored before).
const ORDER = () =>
  sql.join(
    STROKE_ORDER_COLUMNS.map((c) => sql`${c}`),
    sql`, `,
  );
const CURVES = new FixedStatement<"insertedIds" | "seatIds">(
  "stroke_curves",
  (v) => sql`select ${lappingSessions.seatId} as seat_id, ${lappingSessions.stage} as stage,
      string_agg(${strokes.startS}::text, ',' order by ${ORDER()}) as start_s,
      string_agg(${strokes.contrastDb}::text, ',' order by ${ORDER()}) as contrast_db,
      string_agg(array_to_string(${strokes.flags}, '|'), ',' order by ${ORDER()}) as flags,
      string_agg(coalesce(array_position(${v.insertedIds}::uuid[], ${strokes.id}), 0)::text, ',' order by ${ORDER()}) as by
    from ${strokes}
    inner join ${lappingSessions} on ${lappingSessions.id} = ${strokes.sessionId}
    where ${lappingSessions.seatId} = any(${v.seatIds}::uuid[])
    group by ${lappingSessions.seatId}, ${lappingSessions.stage}`,
);

async function writeBatch(tx: Db, batch: StrokeSave[], statements: Statements): Promise<StrokeSaveOutcome[]> {
  statements.begin(tx);
  const userIds = [...new Set(batch.map((s) => s.userId))];
  const sessionIds = [...new Set(batch.map((s) => s.sessionId))];
  type Person = Actor & { active: boolean; sessionVersion: number };
  // Both go out together (lib/bench/statements.ts).
  const [peopleRows, contextRows] = (await statements.run(tx, [
    { statement: PEOPLE, values: { userIds } },
    { statement: CONTEXTS, values: { sessionIds } },
  ])) as [Person[], ContextRow[]];
  const personById = new Map(peopleRows.map((p) => [p.id, p]));
  const contexts: Context[] = contextRows.map((r) => ({
    sessionId: r.session_id,
    session: { stage: r.stage, technicianId: r.technician_id, lastSeenAt: new Date(r.last_seen_at) },
    starterName: r.starter_name,
    seat: { id: r.seat_id, state: r.seat_state, cylinder: r.cylinder, kind: r.kind, position: r.position },
    job: { id: r.job_id, shopId: r.shop_id, number: r.number, status: r.status, assignedTechnicianId: r.assigned_technician_id },
    valveId: r.valve_id,
    valveLappedIn: r.lapped_in_seat_id,
  }));
  const contextBySession = new Map(contexts.map((c) => [c.sessionId, c]));

  // The same checks, in the same order, as a save on its own.
  const outcomes: Array<StrokeSaveOutcome | null> = batch.map(() => null);
  const accepted: Array<{ save: StrokeSave; at: number; actor: Actor; ctx: Context }> = [];
  batch.forEach((save, at) => {
    try {
      const actor = authorize(actorFromRow(personById.get(save.userId), save.sessionVersion), "jobs:work");
      const ctx = contextBySession.get(save.sessionId);
      if (!ctx || ctx.job.shopId !== actor.shopId) throw new NotFoundError(SESSION_NOT_FOUND);
      assertCanWorkOn(actor, ctx.job);
      assertOwnSession(actor, ctx.session, ctx.starterName);
      assertOpenForWork(ctx);
      accepted.push({ save, at, actor, ctx });
    } catch (err) {
      outcomes[at] = { ok: false, error: err };
    }
  });
  if (accepted.length === 0) return outcomes as StrokeSaveOutcome[];

  // The sessions were read under the seats' lock, so their last sign of life is current; most
  // saves find it fresh, and the others have it refreshed in the same message as the insert.
  const now = new Date();
  const staleBefore = now.getTime() - SEAT_HOLD_REFRESH_SECONDS * 1000;
  const stale = [...new Set(accepted.filter((a) => a.ctx.session.lastSeenAt.getTime() < staleBefore).map((a) => a.save.sessionId))];
  const rows = accepted.flatMap(({ save }) => save.strokes.map((s) => ({ ...s, sessionId: save.sessionId })));
  type Stored = { id: string; session_id: string; client_id: string };
  const insertRun = {
    statement: INSERT,
    values: {
      sessionIds: rows.map((r) => r.sessionId),
      clientIds: rows.map((r) => r.clientId),
      indexes: rows.map((r) => r.index),
      starts: rows.map((r) => r.startS),
      ends: rows.map((r) => r.endS),
      onsets: rows.map((r) => r.onsetDb),
      bodies: rows.map((r) => r.bodyDb),
      contrasts: rows.map((r) => r.contrastDb),
      snrs: rows.map((r) => r.bandSnrDb ?? null),
      flags: rows.map((r) => r.flags.join("|")),
    },
  };
  const insertResults = await statements.run(tx, stale.length > 0 ? [{ statement: SEEN, values: { at: now, sessionIds: stale } }, insertRun] : [insertRun]);
  const inserted = insertResults[insertResults.length - 1] as Stored[];
  // Which save stored each new stroke: the first one in arrival order that carried it.
  const firstCarrier = new Map<string, number>();
  accepted.forEach(({ save }, k) => {
    for (const s of save.strokes) {
      const key = `${save.sessionId}/${s.clientId}`;
      if (!firstCarrier.has(key)) firstCarrier.set(key, k);
    }
  });
  // storerOf[n]: the save that stored the n-th new stroke.
  const storerOf = inserted.map((row) => firstCarrier.get(`${row.session_id}/${row.client_id}`)!);
  const acceptedCount = accepted.map(() => 0);
  for (const k of storerOf) acceptedCount[k]!++;

  // The valve in a seat is lapped into it by the seat's first stored stroke, and stays with it;
  // that goes out with the curve read.
  const lappedSeats = new Set<string>();
  accepted.forEach(({ ctx }, k) => {
    if (acceptedCount[k]! > 0 && ctx.valveId && ctx.valveLappedIn === null) lappedSeats.add(ctx.seat.id);
  });
  const seatIds = [...new Set(accepted.map((a) => a.ctx.seat.id))];
  const curvesRun = { statement: CURVES, values: { insertedIds: inserted.map((r) => r.id), seatIds } };
  const curveResults = await statements.run(
    tx,
    lappedSeats.size > 0 ? [{ statement: LAPPED_IN, values: { at: new Date(), seatIds: [...lappedSeats] } }, curvesRun] : [curvesRun],
  );
  const curves = curveResults[curveResults.length - 1] as Array<{ seat_id: string; stage: LappingStage; start_s: string; contrast_db: string; flags: string; by: string }>;
  const bySeat = new Map<string, Array<{ stage: LappingStage; startS: number; contrastDb: number; flags: string[]; by: number | undefined }>>();
  for (const c of curves) {
    const starts = c.start_s.split(",");
    const contrasts = c.contrast_db.split(",");
    const flags = c.flags.split(",");
    const by = c.by.split(",");
    const list = bySeat.get(c.seat_id) ?? [];
    for (let n = 0; n < starts.length; n++) {
      const place = Number(by[n]);
      list.push({
        stage: c.stage,
        startS: Number(starts[n]),
        contrastDb: Number(contrasts[n]),
        flags: flags[n] ? flags[n]!.split("|") : [],
        by: place > 0 ? storerOf[place - 1] : undefined,
      });
    }
    bySeat.set(c.seat_id, list);
  }

  // Each save's verdict sees the strokes stored before it and its own, as it would on its own.
  const stateNow = new Map<string, SeatState>();
  const changes: Array<{ actor: Actor; ctx: Context; before: SeatState; after: SeatState; stage: LappingStage; verdict: SeatVerdict; count: number }> = [];
  accepted.forEach(({ save, at, actor, ctx }, k) => {
    const visible = (bySeat.get(ctx.seat.id) ?? []).filter((s) => s.by === undefined || s.by <= k);
    const stage = ctx.session.stage;
    const currentList = visible.filter((s) => s.stage === stage);
    const current = judgeStage(currentList);
    const fine = stage === "fine" ? current : judgeStage(visible.filter((s) => s.stage === "fine"));
    const before = stateNow.get(ctx.seat.id) ?? ctx.seat.state;
    const next = seatStateFor(before, stage, current, fine);
    if (next !== before) {
      stateNow.set(ctx.seat.id, next);
      changes.push({ actor, ctx, before, after: next, stage, verdict: current, count: currentList.length });
    }
    outcomes[at] = {
      ok: true,
      result: {
        accepted: acceptedCount[k]!,
        duplicates: save.strokes.length - acceptedCount[k]!,
        seatState: next,
        verdict: current,
        strokeCount: currentList.length,
      },
    };
  });

  for (const [seatId, state] of stateNow) {
    await tx.update(seats).set({ state, updatedAt: new Date() }).where(eq(seats.id, seatId));
  }
  for (const c of changes) {
    await recordAudit(tx, {
      actorId: c.actor.id,
      action: "seat.state_changed",
      entityType: "seat",
      entityId: c.ctx.seat.id,
      jobId: c.ctx.job.id,
      before: { state: c.before },
      after: { state: c.after, stage: c.stage, verdict: c.verdict.state, strokes: c.count },
    });
  }
  // New strokes on a head awaiting audit put it back at the bench (rare: no prepared statement).
  const backToBench = new Map<string, { actor: Actor; ctx: Context }>();
  accepted.forEach(({ actor, ctx }, k) => {
    if (acceptedCount[k]! > 0 && ctx.job.status === "awaiting_audit" && !backToBench.has(ctx.job.id)) backToBench.set(ctx.job.id, { actor, ctx });
  });
  for (const { actor, ctx } of backToBench.values()) {
    await backToBenchForWork(tx, actor, ctx.job, `strokes on ${seatCode(ctx.seat)} (${ctx.session.stage})`);
  }
  return outcomes as StrokeSaveOutcome[];
}

/** At most this many strokes go into one batch (PostgreSQL takes at most 65,535 values per statement). */
export const MAX_BATCH_STROKES = 2000;

interface Waiting {
  save: StrokeSave;
  resolve(result: StrokeSaveResult): void;
  reject(error: unknown): void;
}

/**
 * Group commit: a save that finds the database idle is written at once; saves that arrive while
 * a batch is being written wait and go together into the next one. Nothing is held back on a
 * timer, so a lone phone sees no added delay.
 */
export class StrokeSaveQueue {
  private readonly waiting: Waiting[] = [];
  private running = 0;

  constructor(
    private readonly write: (batch: StrokeSave[]) => Promise<StrokeSaveOutcome[]>,
    /** Batches written at the same time. */
    private readonly concurrency = 1,
    private readonly maxStrokes = MAX_BATCH_STROKES,
  ) {}

  private scheduled = false;

  submit(save: StrokeSave): Promise<StrokeSaveResult> {
    return new Promise<StrokeSaveResult>((resolve, reject) => {
      this.waiting.push({ save, resolve, reject });
      // Not at once: the requests that arrived together are still being read; they join when
      // this turn of the event loop has handled its input.
      if (!this.scheduled) {
        this.scheduled = true;
        setImmediate(() => {
          this.scheduled = false;
          this.pump();
        });
      }
    });
  }

  private pump(): void {
    while (this.running < this.concurrency && this.waiting.length > 0) {
      let strokeCount = this.waiting[0]!.save.strokes.length;
      let take = 1;
      while (take < this.waiting.length && strokeCount + this.waiting[take]!.save.strokes.length <= this.maxStrokes) {
        strokeCount += this.waiting[take]!.save.strokes.length;
        take++;
      }
      const batch = this.waiting.splice(0, take);
      this.running++;
      this.write(batch.map((w) => w.save))
        .then(
          (outcomes) =>
            outcomes.forEach((o, i) => (o.ok ? batch[i]!.resolve(o.result) : batch[i]!.reject(o.error))),
          (err: unknown) => batch.forEach((w) => w.reject(err)),
        )
        .finally(() => {
          this.running--;
          this.pump();
        });
    }
  }
}

// One queue per open database, on globalThis: Next bundles this module more than once, and the
// production server's own request path (server.ts) is a bundle of its own.
type GlobalWithQueues = typeof globalThis & { __grindfadeStrokeQueues?: WeakMap<Db, StrokeSaveQueue> };

/** What takes a save: the process's queue, or the database thread's. */
export interface StrokeSaveTaker {
  submit(save: StrokeSave): Promise<StrokeSaveResult>;
}

/**
 * The process's queue for a database. One batch at a time: PGlite runs one transaction at a time
 * anyway, and on a server one batch of many saves costs about what one save did. When PGlite runs
 * on a thread of its own, the queue is there (db/pglite-thread.ts) and each save is handed to it.
 */
export function strokeQueueFor(db: Db): StrokeSaveTaker {
  const submit = strokeSubmitterFor(db);
  if (submit) return { submit };
  const g = globalThis as GlobalWithQueues;
  g.__grindfadeStrokeQueues ??= new WeakMap();
  let queue = g.__grindfadeStrokeQueues.get(db);
  if (!queue) {
    queue = new StrokeSaveQueue((batch) => saveStrokeBatch(db, batch));
    g.__grindfadeStrokeQueues.set(db, queue);
  }
  return queue;
}
