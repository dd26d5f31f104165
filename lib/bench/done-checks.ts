// The done-checks besides the sound, per seat: the contact ring (an even, dull-grey band whose
// width the seat's measurements give), a marking-compound contact test, and a solvent leak test of
// the seat's port. Service manuals and common practice ask for all three before a seat counts as
// lapped; the sound says when to stop lapping, these say the seat seals.
//
// Each record is kept; the latest of each kind counts, and a check recorded before the seat was
// lapped again no longer does (new lapping changes the ring). Recording one is work on the job:
// the technician on the job or a supervisor, never on an approved seat or a signed-off head, with
// the job held against sign-off (lib/jobs/hold.ts) and the audit entry in the same transaction.
import { and, desc, eq, inArray, max } from "drizzle-orm";
import type { Db } from "@/db/client";
import { seatWithJob } from "@/db/queries/jobs";
import { heads, jobs, lappingSessions, measurements, seatChecks, seatPhotos, seats, strokes, users, type Seat } from "@/db/schema";
import type { Actor } from "@/lib/auth/guard";
import { assertCanWorkOn } from "@/lib/auth/job-access";
import { recordAudit } from "@/lib/audit";
import { BadRequestError, ConflictError } from "@/lib/errors";
import { seatCode } from "@/lib/heads/layout";
import { backToBenchForWork } from "@/lib/jobs/hand-in";
import { assertSeatOpen, holdOpenJob, openSeatsNow, signedOffSeats } from "@/lib/jobs/hold";
import { judgeRange, type RangeVerdict } from "@/lib/measure/results";
import { effectiveSpecs } from "@/lib/specs/effective";
import { isClosed } from "@/lib/jobs/lifecycle";
import type { DoneCheckInput } from "@/lib/validations/done-checks";
import { DONE_CHECK_KINDS, DONE_CHECK_LABELS, DONE_CHECK_RESULT_LABELS, type DoneCheckKind, type DoneCheckResult } from "./done-check-words";

export { DONE_CHECK_LABELS, DONE_CHECK_RESULT_LABELS };

type Reader = Pick<Db, "select">;


export interface DoneCheckRecord {
  id: string;
  kind: DoneCheckKind;
  result: DoneCheckResult;
  port: "intake" | "exhaust" | null;
  contactWidthMm: number | null;
  note: string | null;
  photoUrl: string | null;
  recordedBy: string;
  recordedAt: string;
  /** Recorded before the seat was lapped again: kept in the history, no longer counted. */
  stale: boolean;
}

export interface ContactWidth {
  /** The seat's latest contact width measurement, mm; null when none was taken. */
  measuredMm: number | null;
  measuredAt: string | null;
  /** The specification in force: the measurement's own, else the job's (library or override). */
  specMin: number | null;
  specMax: number | null;
  specSource: string | null;
  verdict: RangeVerdict | null;
}

export interface SeatDoneChecks {
  seatId: string;
  code: string;
  jobId: string;
  /** "intake port of cylinder 3": where the leak test's solvent goes. */
  port: string;
  latest: Record<DoneCheckKind, DoneCheckRecord | null>;
  /** Every record, newest first. */
  history: DoneCheckRecord[];
  width: ContactWidth;
  /** Kinds with no record counting (none, or only ones from before the latest lapping). */
  missing: DoneCheckKind[];
  /** Kinds whose counting record failed. */
  failed: DoneCheckKind[];
  complete: boolean;
}

type SeatRow = Pick<Seat, "id" | "cylinder" | "kind" | "position">;

export const portOf = (seat: Pick<Seat, "cylinder" | "kind">) => `${seat.kind} port of cylinder ${seat.cylinder}`;

/** What is missing or failed, in words: "marking-compound test not recorded; leak test failed". */
export function shortfallText(c: Pick<SeatDoneChecks, "missing" | "failed">): string {
  return [
    ...c.missing.map((k) => `${DONE_CHECK_LABELS[k].toLowerCase()} not recorded`),
    ...c.failed.map((k) => `${DONE_CHECK_LABELS[k].toLowerCase()} failed`),
  ].join("; ");
}

/** The counting record of each kind, and what is missing or failed: pure, for the records of one seat. */
export function summarise(records: readonly DoneCheckRecord[]): Pick<SeatDoneChecks, "latest" | "missing" | "failed" | "complete"> {
  const latest = Object.fromEntries(DONE_CHECK_KINDS.map((k) => [k, null])) as Record<DoneCheckKind, DoneCheckRecord | null>;
  for (const r of records) {
    if (r.stale) continue;
    const held = latest[r.kind];
    if (!held || r.recordedAt > held.recordedAt) latest[r.kind] = r;
  }
  const missing = DONE_CHECK_KINDS.filter((k) => !latest[k]);
  const failed = DONE_CHECK_KINDS.filter((k) => latest[k]?.result === "fail");
  return { latest, missing, failed, complete: missing.length === 0 && failed.length === 0 };
}

/** The done-checks of the given seats of one job: five queries, whatever the count. */
export async function doneChecksOf(db: Reader, jobId: string, seatRows: readonly SeatRow[]): Promise<Map<string, SeatDoneChecks>> {
  const out = new Map<string, SeatDoneChecks>();
  if (seatRows.length === 0) return out;
  const ids = seatRows.map((s) => s.id);
  const rows = await db
    .select({ check: seatChecks, recordedBy: users.name })
    .from(seatChecks)
    .innerJoin(users, eq(users.id, seatChecks.recordedById))
    .where(inArray(seatChecks.seatId, ids))
    .orderBy(desc(seatChecks.recordedAt), desc(seatChecks.id));
  const lapped = await db
    .select({ seatId: lappingSessions.seatId, at: max(strokes.createdAt) })
    .from(strokes)
    .innerJoin(lappingSessions, eq(lappingSessions.id, strokes.sessionId))
    .where(inArray(lappingSessions.seatId, ids))
    .groupBy(lappingSessions.seatId);
  const lastLapped = new Map(lapped.map((l) => [l.seatId, l.at ? new Date(l.at) : null]));
  const widths = await db
    .select()
    .from(measurements)
    .where(and(inArray(measurements.seatId, ids), eq(measurements.kind, "seat_contact_width")))
    .orderBy(desc(measurements.createdAt), desc(measurements.id));
  const specs = await effectiveSpecs(db, jobId);

  for (const seat of seatRows) {
    const since = lastLapped.get(seat.id) ?? null;
    const history: DoneCheckRecord[] = rows
      .filter((r) => r.check.seatId === seat.id)
      .map(({ check, recordedBy }) => ({
        id: check.id,
        kind: check.kind,
        result: check.result,
        port: check.port,
        contactWidthMm: check.contactWidthMm,
        note: check.note,
        photoUrl: check.photoId ? `/api/photos/${check.photoId}` : null,
        recordedBy,
        recordedAt: check.recordedAt.toISOString(),
        stale: since !== null && check.recordedAt < since,
      }));
    const measured = widths.find((m) => m.seatId === seat.id);
    const spec = specs.get(seat.kind === "intake" ? "seat_contact_width_intake" : "seat_contact_width_exhaust");
    const specMin = measured ? measured.specMin : (spec?.min ?? null);
    const specMax = measured ? measured.specMax : (spec?.max ?? null);
    const width: ContactWidth = {
      measuredMm: measured?.value ?? null,
      measuredAt: measured ? measured.createdAt.toISOString() : null,
      specMin,
      specMax,
      specSource: measured ? measured.specSource : (spec?.source ?? null),
      verdict: measured && (specMin !== null || specMax !== null) ? judgeRange(measured.value, { min: specMin, max: specMax }) : null,
    };
    out.set(seat.id, { seatId: seat.id, code: seatCode(seat), jobId, port: portOf(seat), history, width, ...summarise(history) });
  }
  return out;
}

const loadSeat = seatWithJob;

/** One seat's done-checks, for anyone of its shop. */
export async function getSeatDoneChecks(db: Reader, actor: Pick<Actor, "shopId">, seatId: string): Promise<SeatDoneChecks> {
  const { seat, job } = await loadSeat(db, actor.shopId, seatId);
  return (await doneChecksOf(db, job.id, [seat])).get(seat.id)!;
}

/** Every seat's done-checks of a job, for the sign-off panel and the report. */
export async function getJobDoneChecks(db: Reader, shopId: string, jobId: string): Promise<Map<string, SeatDoneChecks>> {
  const rows = await db
    .select({ seat: seats })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(jobs.id, jobId), eq(jobs.shopId, shopId)));
  return doneChecksOf(db, jobId, rows.map((r) => r.seat));
}

const fmtMm = (v: number) => `${v.toFixed(2)} mm`;
const specText = (w: ContactWidth) => `${w.specMin !== null ? fmtMm(w.specMin) : "…"}–${w.specMax !== null ? fmtMm(w.specMax) : "…"}`;

/** Records one done-check of a seat; the seat's done-checks as they are afterwards. */
export async function recordDoneCheck(db: Db, actor: Actor, input: DoneCheckInput): Promise<SeatDoneChecks> {
  const { seat, job } = await loadSeat(db, actor.shopId, input.seatId);
  assertCanWorkOn(actor, job);
  // Early answers; both are checked again below with the job held.
  assertSeatOpen(seat, `Seat ${seatCode(seat)} is approved: its done-checks are read-only until a supervisor reopens it.`);
  if (isClosed(job.status)) throw new ConflictError(signedOffSeats(job));
  if (input.photoId) {
    const [photo] = await db
      .select({ id: seatPhotos.id })
      .from(seatPhotos)
      .where(and(eq(seatPhotos.id, input.photoId), eq(seatPhotos.seatId, seat.id)))
      .limit(1);
    if (!photo) throw new BadRequestError("That photo is not one of this seat's. Take the photo again.", { photoId: ["Not a photo of this seat."] });
  }
  await db.transaction(async (tx) => {
    await holdOpenJob(tx, job.id, signedOffSeats);
    await openSeatsNow(tx, [seat.id], `Seat ${seatCode(seat)} is approved: its done-checks are read-only until a supervisor reopens it.`);
    let width: ContactWidth | null = null;
    let measurementId: string | null = null;
    if (input.kind === "contact_ring") {
      width = (await doneChecksOf(tx, job.id, [seat])).get(seat.id)!.width;
      if (width.measuredMm !== null) {
        const [m] = await tx
          .select({ id: measurements.id })
          .from(measurements)
          .where(and(eq(measurements.seatId, seat.id), eq(measurements.kind, "seat_contact_width")))
          .orderBy(desc(measurements.createdAt), desc(measurements.id))
          .limit(1);
        measurementId = m?.id ?? null;
      }
      // A ring that measures outside its specification passes only with a word on why.
      if (input.result === "pass" && width.verdict && width.verdict !== "within_spec" && !input.note) {
        const message = `The measured contact width ${fmtMm(width.measuredMm!)} is ${width.verdict === "below" ? "below" : "above"} ${specText(width)}: record a fail, or say in the note why the ring passes.`;
        throw new BadRequestError(message, { note: [message] });
      }
    }
    const [created] = await tx
      .insert(seatChecks)
      .values({
        seatId: seat.id,
        kind: input.kind,
        result: input.result,
        port: input.kind === "leak_test" ? seat.kind : null,
        contactWidthMm: width?.measuredMm ?? null,
        measurementId,
        note: input.note ?? null,
        photoId: input.photoId ?? null,
        recordedById: actor.id,
      })
      .returning({ id: seatChecks.id });
    await backToBenchForWork(tx, actor, job, `${DONE_CHECK_LABELS[input.kind].toLowerCase()} on seat ${seatCode(seat)}`);
    await recordAudit(tx, {
      actorId: actor.id,
      action: "seat.check_recorded",
      entityType: "seat",
      entityId: seat.id,
      jobId: job.id,
      after: {
        seat: seatCode(seat),
        checkId: created!.id,
        kind: input.kind,
        result: input.result,
        port: input.kind === "leak_test" ? portOf(seat) : null,
        contactWidthMm: width?.measuredMm ?? null,
        note: input.note ?? null,
        photoId: input.photoId ?? null,
      },
    });
  });
  return getSeatDoneChecks(db, actor, seat.id);
}
