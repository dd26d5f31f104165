// The head's sheets on the server: journal oil clearance readings, cap torque sequences, the
// other head measurements and valve identity. Every write checks the shop, the role, that the
// head is not signed off, and lands together with its audit entry.
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import {
  camshafts,
  heads,
  jobs,
  journals,
  measurements,
  seats,
  torqueSheets,
  torqueTicks,
  valves,
  type Job,
} from "@/db/schema";
import type { Actor } from "@/lib/auth/guard";
import { assertCanWorkOn } from "@/lib/auth/job-access";
import { recordAudit } from "@/lib/audit";
import { BadRequestError, ConflictError, NotFoundError } from "@/lib/errors";
import { assertSeatOpen, holdOpenJob, openSeatsNow, signedOffSheets } from "@/lib/jobs/hold";
import { backToBenchForWork } from "@/lib/jobs/hand-in";
import { isClosed } from "@/lib/jobs/lifecycle";
import { judgeClearance, stripCheck, type ClearanceVerdict, type StripCheck, type StripId } from "@/lib/measure/clearance";
import { judgeRange, MEASUREMENT_KINDS, type MeasurementKind, type RangeVerdict } from "@/lib/measure/results";
import {
  centreOutwardOrder,
  checkTick,
  confirmationFigure,
  deviationMessage,
  deviationNeedsConfirmation,
  lastTick,
  nextExpectedTick,
  stagesFor,
  validateOrder,
  type BoltsPerCap,
  type Tick,
  type TighteningStage,
} from "@/lib/measure/torque";
import { effectiveSpec, effectiveSpecs, type EffectiveSpec } from "@/lib/specs/effective";
import type { SpecKey } from "@/lib/specs/keys";
import { seatCode } from "./layout";

type Reader = Pick<Db, "select">;

/**
 * Refused early, before anything is worked out; each write checks again inside its transaction,
 * under the job's hold (holdOpenJob), which is the check that counts.
 */
function assertEditable(actor: Actor, job: Job): void {
  assertCanWorkOn(actor, job);
  if (isClosed(job.status)) throw new ConflictError(signedOffSheets(job));
}

/**
 * The form names the job it was opened on; a journal, camshaft, sheet or valve of another head is
 * refused like one that does not exist, so a write never lands on a head the sheet is not showing.
 */
function assertOnJob(expectedJobId: string | undefined, job: Job, message: string, fieldErrors: Record<string, string[]>): void {
  if (expectedJobId !== undefined && expectedJobId !== job.id) throw new BadRequestError(message, fieldErrors);
}

async function headOfJob(db: Reader, shopId: string, jobId: string) {
  const [row] = await db
    .select({ head: heads, job: jobs })
    .from(heads)
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(jobs.id, jobId), eq(jobs.shopId, shopId)))
    .limit(1);
  if (!row) throw new NotFoundError("That job has no head in your shop.");
  return row;
}

// ---------------------------------------------------------------- journal clearance

export interface ClearanceInput {
  /** The job whose sheet the reading was typed on; the journal must be on its head. */
  jobId?: string;
  journalId: string;
  clearanceMm: number;
  method: "strip" | "diameters";
  stripId: StripId | null;
  boreMm: number | null;
  journalMm: number | null;
  enteredUnit: string;
  spec: { minMm: number; maxMm: number; serviceLimitMm: number | null } | null;
}

export interface ClearanceResult {
  verdict: ClearanceVerdict | null;
  strip: StripCheck | null;
  specSource: "library" | "job_override" | "entered" | null;
  /** A strip read past the end of its scale: kept as typed, not a measured clearance. */
  offScale: boolean;
  /** The reading as the sheet shows it once saved. */
  reading: ClearanceReadingView;
}

/** A journal's saved reading as the clearance sheet shows it. */
export interface ClearanceReadingView {
  clearanceMm: number;
  method: string | null;
  stripId: string | null;
  boreMm: number | null;
  journalMm: number | null;
  enteredUnit: string;
  offScale: boolean;
  verdict: ClearanceVerdict | null;
  strip: StripCheck | null;
  specSource: string | null;
  spec: { minMm: number | null; maxMm: number | null; serviceLimitMm: number | null };
  recordedAt: string;
}

function clearanceReadingView(r: typeof measurements.$inferSelect): ClearanceReadingView {
  const spec = r.specMin !== null && r.specMax !== null ? { minMm: r.specMin, maxMm: r.specMax, serviceLimitMm: r.serviceLimit } : null;
  const strip = r.method === "strip" && r.stripId ? stripCheck(r.value, r.stripId as StripId) : null;
  return {
    clearanceMm: r.value,
    method: r.method,
    stripId: r.stripId,
    boreMm: r.boreMm,
    journalMm: r.journalMm,
    enteredUnit: r.enteredUnit,
    offScale: r.offScale,
    verdict: spec && !r.offScale ? judgeClearance(r.value, spec) : null,
    strip,
    specSource: r.specSource,
    spec: { minMm: r.specMin, maxMm: r.specMax, serviceLimitMm: r.serviceLimit },
    recordedAt: r.updatedAt.toISOString(),
  };
}

function clearanceSpecFrom(spec: EffectiveSpec | null) {
  if (!spec || spec.min === null || spec.max === null) return null;
  return { minMm: spec.min, maxMm: spec.max, serviceLimitMm: spec.limit };
}

export async function recordJournalClearance(db: Db, actor: Actor, input: ClearanceInput): Promise<ClearanceResult> {
  const [row] = await db
    .select({ journal: journals, camshaft: camshafts, head: heads, job: jobs })
    .from(journals)
    .innerJoin(camshafts, eq(camshafts.id, journals.camshaftId))
    .innerJoin(heads, eq(heads.id, camshafts.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(journals.id, input.journalId), eq(jobs.shopId, actor.shopId)))
    .limit(1);
  if (!row) throw new BadRequestError("That journal does not exist on this head.", { journalId: ["No such journal."] });
  assertOnJob(input.jobId, row.job, "That journal does not exist on this head.", { journalId: ["No such journal."] });
  assertEditable(actor, row.job);
  const library = input.spec ? null : await effectiveSpec(db, row.job.id, "journal_clearance");
  const spec = input.spec ?? clearanceSpecFrom(library);
  const specSource: "entered" | "library" | "job_override" | null = input.spec ? "entered" : spec ? library!.source : null;
  const strip = input.method === "strip" && input.stripId ? stripCheck(input.clearanceMm, input.stripId) : null;
  // A strip crushed past the end of its scale gives no clearance to judge: it is kept as off scale.
  const offScale = strip !== null && !strip.ok;
  const verdict = spec && !offScale ? judgeClearance(input.clearanceMm, spec) : null;
  const saved = await db.transaction(async (tx) => {
    await holdOpenJob(tx, row.job.id, signedOffSheets);
    // The journal is locked so that two readings of it at once replace each other rather than both insert.
    await tx.select({ id: journals.id }).from(journals).where(eq(journals.id, input.journalId)).for("no key update");
    const [before] = await tx
      .select()
      .from(measurements)
      .where(and(eq(measurements.journalId, input.journalId), eq(measurements.kind, "journal_clearance")))
      .for("update");
    const values = {
      headId: row.head.id,
      kind: "journal_clearance" as const,
      journalId: input.journalId,
      value: input.clearanceMm,
      enteredUnit: input.enteredUnit,
      method: input.method,
      stripId: input.stripId,
      boreMm: input.boreMm,
      journalMm: input.journalMm,
      offScale,
      specMin: spec?.minMm ?? null,
      specMax: spec?.maxMm ?? null,
      serviceLimit: spec?.serviceLimitMm ?? null,
      specSource,
      recordedById: actor.id,
      updatedAt: new Date(),
    };
    const [stored] = before
      ? await tx.update(measurements).set(values).where(eq(measurements.id, before.id)).returning()
      : await tx.insert(measurements).values(values).returning();
    const id = stored!.id;
    await backToBenchForWork(tx, actor, row.job, "journal clearance");
    await recordAudit(tx, {
      actorId: actor.id,
      action: before ? "measurement.edited" : "measurement.recorded",
      entityType: "measurement",
      entityId: id,
      jobId: row.job.id,
      before: before ? { valueMm: before.value, method: before.method } : null,
      after: {
        kind: "journal_clearance",
        camshaft: row.camshaft.label,
        journal: row.journal.position,
        valueMm: input.clearanceMm,
        method: input.method,
        offScale,
        verdict,
      },
    });
    return stored!;
  });
  return { verdict, strip, specSource, offScale, reading: clearanceReadingView(saved) };
}

export interface ClearanceSheet {
  jobId: string;
  jobNumber: string;
  closed: boolean;
  spec: EffectiveSpec | null;
  camshafts: Array<{
    id: string;
    label: string;
    journals: Array<{
      id: string;
      position: number;
      reading: ClearanceReadingView | null;
    }>;
  }>;
}

export async function getClearanceSheet(db: Db, shopId: string, jobId: string): Promise<ClearanceSheet> {
  const { head, job } = await headOfJob(db, shopId, jobId);
  const cams = await db.select().from(camshafts).where(eq(camshafts.headId, head.id)).orderBy(asc(camshafts.position));
  const js = cams.length
    ? await db.select().from(journals).where(inArray(journals.camshaftId, cams.map((c) => c.id))).orderBy(asc(journals.position))
    : [];
  const readings = await db
    .select()
    .from(measurements)
    .where(and(eq(measurements.headId, head.id), eq(measurements.kind, "journal_clearance")));
  const byJournal = new Map(readings.map((r) => [r.journalId, r]));
  return {
    jobId: job.id,
    jobNumber: job.number,
    closed: isClosed(job.status),
    spec: await effectiveSpec(db, job.id, "journal_clearance"),
    camshafts: cams.map((c) => ({
      id: c.id,
      label: c.label,
      journals: js
        .filter((j) => j.camshaftId === c.id)
        .map((j) => {
          const r = byJournal.get(j.id);
          return { id: j.id, position: j.position, reading: r ? clearanceReadingView(r) : null };
        }),
    })),
  };
}

// ---------------------------------------------------------------- cap torque

export interface TorqueSetupInput {
  jobId?: string;
  camshaftId: string;
  capCount: number;
  boltsPerCap: BoltsPerCap;
  order: "centre-out" | string[];
  finalNm: number | null;
  stageFractions: number[];
  /** Whether the stages were typed as shares of the final or as torques; kept in the audit entry. */
  stagesGivenAs?: "fractions" | "torques";
  /** The final torque in N·m the technician confirmed against the specification in force. */
  confirmedFinalNm?: number | null;
}

/**
 * Sets up a camshaft's cap torque sheet, or replaces its set-up while no bolt is ticked. Refuses a
 * cap count other than the camshaft's journals, and a final torque more than 10 % from the
 * specification in force unless the technician confirmed that very figure.
 */
export async function setUpTorqueSheet(db: Db, actor: Actor, input: TorqueSetupInput): Promise<string> {
  const [row] = await db
    .select({ camshaft: camshafts, head: heads, job: jobs })
    .from(camshafts)
    .innerJoin(heads, eq(heads.id, camshafts.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(camshafts.id, input.camshaftId), eq(jobs.shopId, actor.shopId)))
    .limit(1);
  if (!row) throw new BadRequestError("That camshaft does not exist on this head.", { camshaftId: ["No such camshaft."] });
  assertOnJob(input.jobId, row.job, "That camshaft does not exist on this head.", { camshaftId: ["No such camshaft."] });
  assertEditable(actor, row.job);
  // One cap per journal: a different count means the wrong camshaft or a miscount at the bench.
  if (input.capCount !== row.camshaft.journalCount) {
    const message = `${row.camshaft.label} has ${row.camshaft.journalCount} journals, so ${row.camshaft.journalCount} caps, not ${input.capCount}: count the caps again.`;
    throw new BadRequestError(message, { capCount: [message] });
  }
  const order = input.order === "centre-out" ? centreOutwardOrder(input.capCount, input.boltsPerCap) : input.order;
  const orderErrors = validateOrder(order, input.capCount, input.boltsPerCap);
  if (orderErrors.length) throw new BadRequestError(orderErrors[0]!, { order: orderErrors });
  const torqueSpec = await effectiveSpec(db, row.job.id, "cap_bolt_torque");
  let finalNm = input.finalNm;
  let specSource: "entered" | "library" | "job_override" = "entered";
  // A figure typed in that equals the specification's is the specification's.
  if (finalNm !== null && torqueSpec?.nominal != null && Math.abs(torqueSpec.nominal - finalNm) < 0.05) specSource = torqueSpec.source;
  if (finalNm === null) {
    if (!torqueSpec?.nominal) {
      throw new BadRequestError("Enter the final torque: the engine's specification has none.", { finalTorque: ["Enter the engine maker's figure."] });
    }
    finalNm = torqueSpec.nominal;
    specSource = torqueSpec.source;
  }
  const specNm = torqueSpec?.nominal ?? null;
  if (deviationNeedsConfirmation(finalNm, specNm)) {
    const confirmed = input.confirmedFinalNm;
    if (confirmed == null || confirmationFigure(confirmed) !== confirmationFigure(finalNm)) {
      const message = deviationMessage(finalNm, specNm!);
      throw new BadRequestError(message, { confirmDeviation: [message] });
    }
  }
  stagesFor(finalNm, input.stageFractions);
  const setUp = {
    capCount: input.capCount,
    boltsPerCap: input.boltsPerCap,
    order,
    finalNm,
    stageFractions: input.stageFractions,
    stagesGivenAs: input.stagesGivenAs ?? "fractions",
    specSource,
    specNm,
  };
  return db.transaction(async (tx) => {
    await holdOpenJob(tx, row.job.id, signedOffSheets);
    // The camshaft is locked so that two set-ups at once run one after the other (one sheet per camshaft).
    await tx.select({ id: camshafts.id }).from(camshafts).where(eq(camshafts.id, input.camshaftId)).for("no key update");
    const [existing] = await tx.select().from(torqueSheets).where(eq(torqueSheets.camshaftId, input.camshaftId)).for("update");
    if (existing) {
      const ticked = await tx.select({ id: torqueTicks.id }).from(torqueTicks).where(eq(torqueTicks.sheetId, existing.id)).limit(1);
      if (ticked.length) {
        throw new ConflictError("Bolts are already ticked on this sheet; its order and torque can no longer change. Undo the ticks first if the set-up was wrong.");
      }
      await tx.delete(torqueSheets).where(eq(torqueSheets.id, existing.id));
    }
    const [sheet] = await tx
      .insert(torqueSheets)
      .values({
        headId: row.head.id,
        camshaftId: input.camshaftId,
        capCount: input.capCount,
        boltsPerCap: input.boltsPerCap,
        boltOrder: order,
        orderSource: input.order === "centre-out" ? "centre-out" : "maker",
        finalNm: finalNm!,
        stageFractions: input.stageFractions,
        specSource,
        createdById: actor.id,
      })
      .returning({ id: torqueSheets.id });
    await backToBenchForWork(tx, actor, row.job, "cap torque set-up");
    await recordAudit(tx, {
      actorId: actor.id,
      action: existing ? "torque_sheet.changed" : "torque_sheet.set_up",
      entityType: "torque_sheet",
      entityId: sheet!.id,
      jobId: row.job.id,
      before: existing
        ? {
            sheetId: existing.id,
            capCount: existing.capCount,
            boltsPerCap: existing.boltsPerCap,
            order: existing.boltOrder,
            finalNm: existing.finalNm,
            stageFractions: existing.stageFractions,
            specSource: existing.specSource,
          }
        : null,
      after: {
        camshaft: row.camshaft.label,
        ...setUp,
        confirmedAgainstSpec: deviationNeedsConfirmation(finalNm!, specNm) ? { finalNm, specNm } : null,
      },
    });
    return sheet!.id;
  });
}

export interface TorqueSheetView {
  id: string;
  camshaftId: string;
  camshaftLabel: string;
  capCount: number;
  boltsPerCap: number;
  order: string[];
  orderSource: string;
  finalNm: number;
  specSource: string;
  stages: TighteningStage[];
  ticks: Tick[];
  next: Tick | null;
  /** The tick that may be undone: the latest in the sequence. */
  last: Tick | null;
}

export async function getTorqueSheets(db: Db, shopId: string, jobId: string) {
  const { head, job } = await headOfJob(db, shopId, jobId);
  const cams = await db.select().from(camshafts).where(eq(camshafts.headId, head.id)).orderBy(asc(camshafts.position));
  const sheets = await db.select().from(torqueSheets).where(eq(torqueSheets.headId, head.id));
  const ticks = sheets.length
    ? await db.select().from(torqueTicks).where(inArray(torqueTicks.sheetId, sheets.map((s) => s.id))).orderBy(asc(torqueTicks.tickedAt))
    : [];
  const views: TorqueSheetView[] = sheets.map((s) => {
    const stages = stagesFor(s.finalNm, s.stageFractions);
    const mine = ticks.filter((t) => t.sheetId === s.id).map((t) => ({ stage: t.stage, boltId: t.boltId }));
    return {
      id: s.id,
      camshaftId: s.camshaftId,
      camshaftLabel: cams.find((c) => c.id === s.camshaftId)?.label ?? "Camshaft",
      capCount: s.capCount,
      boltsPerCap: s.boltsPerCap,
      order: s.boltOrder,
      orderSource: s.orderSource,
      finalNm: s.finalNm,
      specSource: s.specSource,
      stages,
      ticks: mine,
      next: nextExpectedTick(s.boltOrder, stages, mine),
      last: lastTick(s.boltOrder, stages, mine),
    };
  });
  return {
    jobId: job.id,
    jobNumber: job.number,
    closed: isClosed(job.status),
    torqueSpec: await effectiveSpec(db, job.id, "cap_bolt_torque"),
    camshafts: cams.map((c) => ({ id: c.id, label: c.label, journalCount: c.journalCount, sheet: views.find((v) => v.camshaftId === c.id) ?? null })),
  };
}

/** A torque sheet with its job and stages, refused unless it is in the caller's shop, on this job, and editable. */
async function loadSheetForWork(db: Db, actor: Actor, sheetId: string, jobId: string | undefined) {
  const [row] = await db
    .select({ sheet: torqueSheets, job: jobs })
    .from(torqueSheets)
    .innerJoin(heads, eq(heads.id, torqueSheets.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(torqueSheets.id, sheetId), eq(jobs.shopId, actor.shopId)))
    .limit(1);
  if (!row) throw new NotFoundError("That torque sheet does not exist in your shop.");
  assertOnJob(jobId, row.job, "That torque sheet is not on this head.", { sheetId: ["No such torque sheet."] });
  assertEditable(actor, row.job);
  return { ...row, stages: stagesFor(row.sheet.finalNm, row.sheet.stageFractions) };
}

export async function tickBolt(db: Db, actor: Actor, input: { jobId?: string; sheetId: string; stage: number; boltId: string }): Promise<Tick | null> {
  const { stages, ...row } = await loadSheetForWork(db, actor, input.sheetId, input.jobId);
  return db.transaction(async (tx) => {
    await holdOpenJob(tx, row.job.id, signedOffSheets);
    // Lock the sheet so two phones ticking at once are checked one after the other.
    await tx.select({ id: torqueSheets.id }).from(torqueSheets).where(eq(torqueSheets.id, input.sheetId)).for("update");
    const done = (await tx.select().from(torqueTicks).where(eq(torqueTicks.sheetId, input.sheetId))).map((t) => ({ stage: t.stage, boltId: t.boltId }));
    const check = checkTick(row.sheet.boltOrder, stages, done, { stage: input.stage, boltId: input.boltId });
    if (!check.ok) throw new ConflictError(check.message);
    await tx.insert(torqueTicks).values({ sheetId: input.sheetId, stage: input.stage, boltId: input.boltId, tickedById: actor.id });
    await backToBenchForWork(tx, actor, row.job, "cap torque tick");
    const stage = stages.find((s) => s.stage === input.stage)!;
    await recordAudit(tx, {
      actorId: actor.id,
      action: "torque.ticked",
      entityType: "torque_sheet",
      entityId: input.sheetId,
      jobId: row.job.id,
      after: { bolt: input.boltId, stage: input.stage, nm: stage.nm },
    });
    return nextExpectedTick(row.sheet.boltOrder, stages, [...done, { stage: input.stage, boltId: input.boltId }]);
  });
}

/**
 * Undoes a tick made by mistake: only the latest tick of the sheet, named by its bolt and stage so
 * a phone showing an older sheet cannot undo the wrong one, and only with a reason. The tick goes,
 * the audit trail keeps who ticked it, when, who undid it and why.
 */
export async function undoTick(
  db: Db,
  actor: Actor,
  input: { jobId?: string; sheetId: string; stage: number; boltId: string; reason: string },
): Promise<Tick | null> {
  const { stages, ...row } = await loadSheetForWork(db, actor, input.sheetId, input.jobId);
  return db.transaction(async (tx) => {
    await holdOpenJob(tx, row.job.id, signedOffSheets);
    await tx.select({ id: torqueSheets.id }).from(torqueSheets).where(eq(torqueSheets.id, input.sheetId)).for("update");
    const rows = await tx.select().from(torqueTicks).where(eq(torqueTicks.sheetId, input.sheetId));
    const latest = lastTick(row.sheet.boltOrder, stages, rows);
    if (!latest) throw new ConflictError("No bolt is ticked on this sheet: there is nothing to undo.");
    if (latest.stage !== input.stage || latest.boltId !== input.boltId) {
      throw new ConflictError(
        `Only the latest tick can be undone: ${latest.boltId} at stage ${latest.stage}. Undo ticks from the latest back.`,
      );
    }
    const tick = rows.find((t) => t.stage === latest.stage && t.boltId === latest.boltId)!;
    await tx.delete(torqueTicks).where(eq(torqueTicks.id, tick.id));
    await backToBenchForWork(tx, actor, row.job, "cap torque tick undone");
    await recordAudit(tx, {
      actorId: actor.id,
      action: "torque.tick_undone",
      entityType: "torque_sheet",
      entityId: input.sheetId,
      jobId: row.job.id,
      before: { bolt: tick.boltId, stage: tick.stage, tickedById: tick.tickedById, tickedAt: tick.tickedAt.toISOString() },
      after: { reason: input.reason },
    });
    return latest;
  });
}

// ---------------------------------------------------------------- other measurements

export interface MeasurementInput {
  jobId: string;
  kind: Exclude<MeasurementKind, "journal_clearance">;
  seatId: string | null;
  valueSi: number;
  enteredUnit: string;
  method: string | null;
  spec: { min: number | null; max: number | null } | null;
  note: string | null;
}

/** Which library figure applies to a measurement; per-seat figures differ for intake and exhaust. */
export function specKeyFor(kind: MeasurementInput["kind"], seatKind: "intake" | "exhaust" | null): SpecKey | null {
  switch (kind) {
    case "seat_contact_width":
      return seatKind ? `seat_contact_width_${seatKind}` : null;
    case "valve_stem_diameter":
      return seatKind ? `valve_stem_diameter_${seatKind}` : null;
    case "stem_guide_clearance":
      return seatKind ? `stem_guide_clearance_${seatKind}` : null;
    case "installed_spring_height":
      return "installed_spring_height";
    case "spring_load":
      return "spring_load";
    case "deck_flatness":
      return "deck_flatness";
  }
}

export interface SavedMeasurement {
  id: string;
  kind: MeasurementInput["kind"];
  seatId: string | null;
  valueSi: number;
  enteredUnit: string;
  method: string | null;
  specMin: number | null;
  specMax: number | null;
  specSource: "library" | "job_override" | "entered" | null;
  verdict: RangeVerdict | null;
  /** This reading replaced an earlier one of the same figure on the same seat (or head). */
  replaced: { valueSi: number } | null;
  recordedAt: string;
}

/**
 * Records one or more measurements of a head in one transaction. A figure is held once per seat
 * (or once per head for head measurements): a second reading of it replaces the first, and the
 * audit trail keeps the value it replaced.
 */
export async function recordMeasurements(db: Db, actor: Actor, jobId: string, inputs: readonly MeasurementInput[]): Promise<SavedMeasurement[]> {
  const { head, job } = await headOfJob(db, actor.shopId, jobId);
  assertEditable(actor, job);
  const specs = await effectiveSpecs(db, job.id);
  const seatIds = [...new Set(inputs.map((i) => i.seatId).filter((id): id is string => id !== null))];
  const seatRows = seatIds.length ? await db.select().from(seats).where(and(inArray(seats.id, seatIds), eq(seats.headId, head.id))) : [];
  const planned = inputs.map((input) => {
    const info = MEASUREMENT_KINDS[input.kind];
    let seatKind: "intake" | "exhaust" | null = null;
    if (info.scope === "seat") {
      if (!input.seatId) throw new BadRequestError("Choose the seat this was measured on.", { seatId: ["Choose a seat."] });
      const seat = seatRows.find((s) => s.id === input.seatId);
      if (!seat) throw new BadRequestError("That seat is not on this head.", { seatId: ["No such seat."] });
      assertSeatOpen(seat);
      seatKind = seat.kind;
    }
    const key = specKeyFor(input.kind, seatKind);
    const library = !input.spec && key ? (specs.get(key) ?? null) : null;
    const spec = input.spec ?? (library ? { min: library.min, max: library.max } : null);
    const specSource: SavedMeasurement["specSource"] = input.spec ? "entered" : library ? library.source : null;
    const verdict: RangeVerdict | null =
      spec && (spec.min !== null || spec.max !== null) ? judgeRange(input.valueSi, { min: spec.min ?? undefined, max: spec.max ?? undefined }) : null;
    return { input, info, seatId: info.scope === "seat" ? input.seatId : null, spec, library, specSource, verdict };
  });
  return db.transaction(async (tx) => {
    await holdOpenJob(tx, job.id, signedOffSheets);
    // The seats are read again under the hold. Two readings of one figure at once must replace
    // each other rather than both insert, so each (seat, figure) is taken by a transaction lock of
    // its own, in one order. Not a lock on the seat rows: a seat decision holds its seat and then
    // its job, while this write holds the job first, and the two would wait for each other.
    if (seatIds.length) await openSeatsNow(tx, seatIds);
    const keys = [...new Set(planned.map((p) => `measurement:${head.id}:${p.seatId ?? "head"}:${p.input.kind}`))].sort();
    for (const key of keys) await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${key}, 0))`);
    const out: SavedMeasurement[] = [];
    for (const p of planned) {
      const [before] = await tx
        .select()
        .from(measurements)
        .where(and(eq(measurements.headId, head.id), eq(measurements.kind, p.input.kind), p.seatId ? eq(measurements.seatId, p.seatId) : isNull(measurements.seatId)))
        .orderBy(desc(measurements.updatedAt))
        .limit(1)
        .for("update");
      const values = {
        headId: head.id,
        kind: p.input.kind,
        seatId: p.seatId,
        value: p.input.valueSi,
        enteredUnit: p.input.enteredUnit,
        method: p.input.method,
        specMin: p.spec?.min ?? null,
        specMax: p.spec?.max ?? null,
        serviceLimit: p.library?.limit ?? null,
        specSource: p.specSource,
        note: p.input.note,
        recordedById: actor.id,
        updatedAt: new Date(),
      };
      // The same figure typed again (same value, unit and method) changes nothing and is not audited again.
      if (before && before.value === p.input.valueSi && before.enteredUnit === p.input.enteredUnit && before.method === p.input.method && !p.input.spec) {
        out.push({ ...savedView(before), specSource: before.specSource });
        continue;
      }
      const [stored] = before
        ? await tx.update(measurements).set(values).where(eq(measurements.id, before.id)).returning()
        : await tx.insert(measurements).values(values).returning();
      await recordAudit(tx, {
        actorId: actor.id,
        action: before ? "measurement.edited" : "measurement.recorded",
        entityType: "measurement",
        entityId: stored!.id,
        jobId: job.id,
        before: before ? { valueSi: before.value, method: before.method, enteredUnit: before.enteredUnit } : null,
        after: { kind: p.input.kind, valueSi: p.input.valueSi, method: p.input.method, verdict: p.verdict, specSource: p.specSource },
      });
      out.push({
        id: stored!.id,
        kind: p.input.kind,
        seatId: p.seatId,
        valueSi: stored!.value,
        enteredUnit: stored!.enteredUnit,
        method: stored!.method,
        specMin: stored!.specMin,
        specMax: stored!.specMax,
        specSource: p.specSource,
        verdict: p.verdict,
        replaced: before ? { valueSi: before.value } : null,
        recordedAt: stored!.updatedAt.toISOString(),
      });
    }
    const labels = [...new Set(planned.map((p) => p.info.label.toLowerCase()))].join(", ");
    await backToBenchForWork(tx, actor, job, labels);
    return out;
  });
}

export async function recordMeasurement(db: Db, actor: Actor, input: MeasurementInput) {
  const [saved] = await recordMeasurements(db, actor, input.jobId, [input]);
  return saved!;
}

/** The specification in force for one figure, as the grid shows it beside the field. */
export interface SpecInForce {
  min: number | null;
  max: number | null;
  source: "library" | "job_override";
}

export interface MeasurementGrid {
  closed: boolean;
  /** The per-seat figures, in the order of the grid's columns. */
  kinds: Array<Exclude<MeasurementKind, "journal_clearance" | "deck_flatness">>;
  seats: Array<{
    id: string;
    code: string;
    kind: "intake" | "exhaust";
    approved: boolean;
    /** The specification in force per figure for this seat's kind; absent when none is on file. */
    specs: Partial<Record<string, SpecInForce>>;
    readings: Partial<Record<string, SavedMeasurement>>;
  }>;
}

export const GRID_KINDS = ["seat_contact_width", "valve_stem_diameter", "stem_guide_clearance", "installed_spring_height", "spring_load"] as const;

/** The seat × measurement grid: every seat of the head with its readings and the specification in force. */
export async function getMeasurementGrid(db: Db, shopId: string, jobId: string): Promise<MeasurementGrid> {
  const { head, job } = await headOfJob(db, shopId, jobId);
  const specs = await effectiveSpecs(db, job.id);
  const ss = await db.select().from(seats).where(eq(seats.headId, head.id)).orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position));
  const ms = await db
    .select()
    .from(measurements)
    .where(and(eq(measurements.headId, head.id), inArray(measurements.kind, [...GRID_KINDS])))
    .orderBy(asc(measurements.updatedAt));
  return {
    closed: isClosed(job.status),
    kinds: [...GRID_KINDS],
    seats: ss.map((seat) => {
      const seatSpecs: Partial<Record<string, SpecInForce>> = {};
      for (const kind of GRID_KINDS) {
        const s = specs.get(specKeyFor(kind, seat.kind)!);
        if (s && (s.min !== null || s.max !== null)) seatSpecs[kind] = { min: s.min, max: s.max, source: s.source };
      }
      const readings: Partial<Record<string, SavedMeasurement>> = {};
      // Older duplicate rows (from before a second reading replaced the first) give way to the latest.
      for (const m of ms.filter((m) => m.seatId === seat.id)) readings[m.kind] = savedView(m);
      return { id: seat.id, code: seatCode(seat), kind: seat.kind, approved: seat.state === "approved", specs: seatSpecs, readings };
    }),
  };
}

function savedView(m: typeof measurements.$inferSelect): SavedMeasurement {
  const verdict = m.specMin !== null || m.specMax !== null ? judgeRange(m.value, { min: m.specMin ?? undefined, max: m.specMax ?? undefined }) : null;
  return {
    id: m.id,
    kind: m.kind as SavedMeasurement["kind"],
    seatId: m.seatId,
    valueSi: m.value,
    enteredUnit: m.enteredUnit,
    method: m.method,
    specMin: m.specMin,
    specMax: m.specMax,
    specSource: m.specSource,
    verdict,
    replaced: null,
    recordedAt: m.updatedAt.toISOString(),
  };
}

export interface MeasurementRow {
  id: string;
  kind: MeasurementKind;
  label: string;
  where: string;
  /** Whether "where" is a seat code (shown in the monospace font). */
  whereIsSeat: boolean;
  valueSi: number;
  enteredUnit: string;
  method: string | null;
  specMin: number | null;
  specMax: number | null;
  serviceLimit: number | null;
  specSource: string | null;
  verdict: string | null;
  recordedAt: string;
}

export async function listMeasurements(db: Db, shopId: string, jobId: string): Promise<MeasurementRow[]> {
  const { head } = await headOfJob(db, shopId, jobId);
  const rows = await db
    .select({ m: measurements, seat: seats, journal: journals, camshaft: camshafts })
    .from(measurements)
    .leftJoin(seats, eq(seats.id, measurements.seatId))
    .leftJoin(journals, eq(journals.id, measurements.journalId))
    .leftJoin(camshafts, eq(camshafts.id, journals.camshaftId))
    .where(eq(measurements.headId, head.id))
    .orderBy(asc(measurements.kind), asc(measurements.createdAt));
  // Torque lives on its own sheet; measurements of other kinds are listed here.
  return rows.flatMap(({ m, seat, journal, camshaft }) => {
    if (m.kind === "cap_torque") return [];
    const kind = m.kind;
    const spec = { min: m.specMin ?? undefined, max: m.specMax ?? undefined };
    const verdict =
      m.kind === "journal_clearance"
        ? m.offScale
          ? "off_scale"
          : m.specMin !== null && m.specMax !== null
            ? judgeClearance(m.value, { minMm: m.specMin, maxMm: m.specMax, serviceLimitMm: m.serviceLimit })
            : null
        : m.specMin !== null || m.specMax !== null
          ? judgeRange(m.value, spec)
          : null;
    return {
      id: m.id,
      kind,
      label: MEASUREMENT_KINDS[kind].label,
      where: seat ? seatCode(seat) : journal && camshaft ? `${camshaft.label}, journal ${journal.position}` : "Head",
      whereIsSeat: Boolean(seat),
      valueSi: m.value,
      enteredUnit: m.enteredUnit,
      method: m.method,
      specMin: m.specMin,
      specMax: m.specMax,
      serviceLimit: m.serviceLimit,
      specSource: m.specSource,
      verdict,
      recordedAt: m.updatedAt.toISOString(),
    } satisfies MeasurementRow;
  });
}

export { effectiveSpecs };

// ---------------------------------------------------------------- valves

/** The valve with its job, refused unless it is in the caller's shop, on this job, and editable. */
async function loadValveForEdit(db: Db, actor: Actor, valveId: string, jobId: string | undefined) {
  const [row] = await db
    .select({ valve: valves, job: jobs })
    .from(valves)
    .innerJoin(heads, eq(heads.id, valves.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(valves.id, valveId), eq(jobs.shopId, actor.shopId)))
    .limit(1);
  if (!row) throw new NotFoundError("That valve does not exist in your shop.");
  assertOnJob(jobId, row.job, "That valve is not on this head.", { valveId: ["No such valve."] });
  assertEditable(actor, row.job);
  if (row.valve.seatId) {
    const [home] = await db.select().from(seats).where(eq(seats.id, row.valve.seatId));
    if (home) assertSeatOpen(home);
  }
  return row;
}

/** Holds the job (holdOpenJob) and locks the valve, answering the valve as it is now. */
async function holdValve(tx: Reader, jobId: string, valveId: string) {
  await holdOpenJob(tx, jobId, signedOffSheets);
  const [valve] = await tx.select().from(valves).where(eq(valves.id, valveId)).limit(1).for("update");
  if (!valve) throw new NotFoundError("That valve does not exist in your shop.");
  return valve;
}

export async function updateValveIdentity(
  db: Db,
  actor: Actor,
  input: { jobId?: string; valveId: string; tag: string; partNumber: string | null; serial: string | null },
) {
  const row = await loadValveForEdit(db, actor, input.valveId, input.jobId);
  await db.transaction(async (tx) => {
    const valve = await holdValve(tx, row.job.id, input.valveId);
    if (valve.seatId) await openSeatsNow(tx, [valve.seatId]);
    await tx
      .update(valves)
      .set({ tag: input.tag, partNumber: input.partNumber, serial: input.serial, updatedAt: new Date() })
      .where(eq(valves.id, input.valveId));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "valve.identified",
      entityType: "valve",
      entityId: input.valveId,
      jobId: row.job.id,
      before: { tag: row.valve.tag, partNumber: row.valve.partNumber, serial: row.valve.serial },
      after: { tag: input.tag, partNumber: input.partNumber, serial: input.serial },
    });
  });
}

/**
 * Puts a valve in another seat. A valve lapped into a seat stays with it (service manuals: a
 * valve goes back into the seat it was lapped in); before lapping, valves may be swapped, and
 * the swap is recorded.
 */
export async function moveValve(db: Db, actor: Actor, input: { jobId?: string; valveId: string; toSeatId: string }) {
  const row = await loadValveForEdit(db, actor, input.valveId, input.jobId);
  const [target] = await db.select().from(seats).where(and(eq(seats.id, input.toSeatId), eq(seats.headId, row.valve.headId)));
  if (!target) throw new BadRequestError("That seat is not on this head.", { toSeatId: ["Choose a seat of this head."] });
  if (row.valve.seatId === target.id) return;
  assertSeatOpen(target);
  const [from] = row.valve.seatId ? await db.select().from(seats).where(eq(seats.id, row.valve.seatId)) : [];
  if (row.valve.lappedInSeatId && row.valve.lappedInSeatId !== target.id) {
    const [home] = await db.select().from(seats).where(eq(seats.id, row.valve.lappedInSeatId));
    throw new ConflictError(
      `Valve ${row.valve.tag} was lapped into seat ${home ? seatCode(home) : "its seat"} and must go back into that seat: a lapped valve only seals the seat it was lapped in.`,
    );
  }
  if (target.kind !== (from?.kind ?? target.kind)) {
    throw new BadRequestError(`Valve ${row.valve.tag} is an ${from?.kind} valve; seat ${seatCode(target)} is ${target.kind}.`, {
      toSeatId: ["Choose a seat of the same kind."],
    });
  }
  await db.transaction(async (tx) => {
    const valve = await holdValve(tx, row.job.id, row.valve.id);
    await openSeatsNow(tx, valve.seatId ? [valve.seatId, target.id] : [target.id]);
    if (valve.seatId !== row.valve.seatId || valve.lappedInSeatId !== row.valve.lappedInSeatId) {
      throw new ConflictError(`Valve ${row.valve.tag} was moved or lapped a moment ago. Reload the sheet and try again.`);
    }
    const [occupant] = await tx.select().from(valves).where(eq(valves.seatId, target.id)).for("update");
    if (occupant?.lappedInSeatId) {
      throw new ConflictError(`Seat ${seatCode(target)} already holds valve ${occupant.tag}, lapped into it; it cannot be swapped out.`);
    }
    // Free the target first: one valve per seat is a unique constraint.
    if (occupant) await tx.update(valves).set({ seatId: null }).where(eq(valves.id, occupant.id));
    await tx.update(valves).set({ seatId: target.id, updatedAt: new Date() }).where(eq(valves.id, row.valve.id));
    if (occupant) await tx.update(valves).set({ seatId: row.valve.seatId, updatedAt: new Date() }).where(eq(valves.id, occupant.id));
    await recordAudit(tx, {
      actorId: actor.id,
      action: occupant ? "valve.swapped" : "valve.moved",
      entityType: "valve",
      entityId: row.valve.id,
      jobId: row.job.id,
      before: { valve: row.valve.tag, seat: from ? seatCode(from) : null },
      after: { valve: row.valve.tag, seat: seatCode(target), swappedWith: occupant?.tag ?? null },
    });
  });
}
