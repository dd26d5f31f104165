"use server";

// Server actions for the head's sheets. Each checks the session and role first, validates with
// the shared zod schemas, and leaves the database unchanged when it refuses.
import { revalidatePath } from "next/cache";
import { z, type ZodError } from "zod";
import { getDb } from "@/db/client";
import { requireActor } from "@/lib/auth/guard";
import {
  GRID_KINDS,
  moveValve,
  recordJournalClearance,
  recordMeasurement,
  recordMeasurements,
  setUpTorqueSheet,
  tickBolt,
  undoTick,
  updateValveIdentity,
  type ClearanceReadingView,
  type SavedMeasurement,
} from "@/lib/heads/sheets";
import { CLEARANCE_VERDICT_LABELS } from "@/lib/measure/clearance";
import { MEASUREMENT_KINDS, RANGE_VERDICT_LABELS } from "@/lib/measure/results";
import { toMm } from "@/lib/measure/units";
import {
  clearanceMmOf,
  clearanceSpecMm,
  clearanceSpecSchema,
  finalTorqueNmOf,
  journalClearanceReadingSchema,
  measurementSchema,
  measurementSi,
  stageFractionsOf,
  tickSchema,
  tickUndoSchema,
  torqueSheetSetupSchema,
} from "@/lib/validations/measurements";
import { storableText } from "@/lib/validations/text";
import { fieldErrorsOf } from "@/lib/errors";
import { actionFailure, type ActionState, type ResultTone } from "./state";
import { uuidText } from "@/lib/validations/ids";


const text = (f: FormData, k: string) => {
  const v = f.get(k);
  return typeof v === "string" ? v : undefined;
};

function done(jobId: string, sub: string, message: string): ActionState {
  revalidatePath(`/jobs/${jobId}`);
  revalidatePath(`/jobs/${jobId}/${sub}`);
  return { ok: true, message, fieldErrors: {} };
}

const jobIdSchema = uuidText("Unknown job.");
const noteSchema = z.object({
  note: storableText(z.string().trim().max(300, "Keep the note under 300 characters.")).transform((v) => v || null),
});

/**
 * A sheet save answers with what it saved and re-renders nothing else: the form shows the saved
 * reading itself, and other screens read the database when they are opened (they are dynamic).
 */
function saved<T>(message: string, tone: ResultTone, value: T): ActionState<T> {
  return { ok: true, message, tone, fieldErrors: {}, saved: value };
}

/** Every refusal of a form at once: the zod issues of each part, merged field by field. */
function refusedFields(...results: Array<{ success: boolean; error?: ZodError }>): ActionState<never> | null {
  const fieldErrors: Record<string, string[]> = {};
  for (const r of results) {
    if (r.success || !r.error) continue;
    for (const [k, v] of Object.entries(fieldErrorsOf(r.error))) (fieldErrors[k] ??= []).push(...v);
  }
  if (!Object.keys(fieldErrors).length) return null;
  const n = Object.keys(fieldErrors).length;
  return { ok: false, message: n === 1 ? "Check the highlighted field: nothing was saved." : `Check the ${n} highlighted fields: nothing was saved.`, fieldErrors };
}

export async function saveClearanceReading(_prev: ActionState, f: FormData): Promise<ActionState<ClearanceReadingView>> {
  try {
    const actor = await requireActor("jobs:work");
    const jobId = jobIdSchema.parse(text(f, "jobId"));
    const method = text(f, "method");
    const readingResult = journalClearanceReadingSchema.safeParse(
      method === "diameters"
        ? { journalId: text(f, "journalId"), method, boreValue: text(f, "boreValue"), journalValue: text(f, "journalValue"), unit: text(f, "unit") }
        : { journalId: text(f, "journalId"), method: "strip", stripId: text(f, "stripId"), value: text(f, "value"), unit: text(f, "unit") },
    );
    const hasSpec = [text(f, "specMin"), text(f, "specMax"), text(f, "specLimit")].some((v) => v && v.trim() !== "");
    const specResult = hasSpec
      ? clearanceSpecSchema.safeParse({ min: text(f, "specMin"), max: text(f, "specMax"), serviceLimit: text(f, "specLimit"), unit: text(f, "unit") })
      : null;
    // Every refused field at once: the reading's and the specification's.
    const refusal = refusedFields(readingResult, ...(specResult ? [specResult] : []));
    if (refusal || !readingResult.success || (specResult && !specResult.success)) return refusal ?? actionFailure(readingResult.error);
    const reading = readingResult.data;
    const spec = specResult?.success ? clearanceSpecMm(specResult.data) : null;
    const clearanceMm = clearanceMmOf(reading);
    const result = await recordJournalClearance(await getDb(), actor, {
      jobId,
      journalId: reading.journalId,
      clearanceMm,
      method: reading.method,
      stripId: reading.method === "strip" ? reading.stripId : null,
      boreMm: reading.method === "diameters" ? toMm(reading.boreValue, reading.unit) : null,
      journalMm: reading.method === "diameters" ? toMm(reading.journalValue, reading.unit) : null,
      enteredUnit: reading.unit,
      spec: spec ? { minMm: spec.minMm, maxMm: spec.maxMm, serviceLimitMm: spec.serviceLimitMm ?? null } : null,
    });
    if (result.offScale && result.strip && !result.strip.ok) {
      return saved(`Saved as off scale, not as a clearance: ${result.strip.message}`, "warn", result.reading);
    }
    const verdict = result.verdict ? CLEARANCE_VERDICT_LABELS[result.verdict] : "no specification to judge against";
    const tone: ResultTone = result.verdict === "within_spec" ? "ok" : "warn";
    return saved(`${clearanceMm.toFixed(3)} mm — ${verdict}.`, tone, result.reading);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function saveTorqueSetup(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:work");
    const jobId = jobIdSchema.parse(text(f, "jobId"));
    const setup = torqueSheetSetupSchema.parse({
      camshaftId: text(f, "camshaftId"),
      capCount: text(f, "capCount"),
      boltsPerCap: text(f, "boltsPerCap"),
      order: text(f, "orderMode") === "maker" ? (text(f, "order") ?? "") : "centre-out",
      finalTorque: { value: text(f, "finalTorque"), unit: text(f, "finalTorqueUnit") },
      stageFractions: text(f, "stageFractions"),
      stageMode: text(f, "stageMode"),
      stageTorques: text(f, "stageTorques"),
      confirmDeviation: text(f, "confirmDeviation"),
    });
    await setUpTorqueSheet(await getDb(), actor, {
      jobId,
      camshaftId: setup.camshaftId,
      capCount: setup.capCount,
      boltsPerCap: setup.boltsPerCap,
      order: setup.order,
      finalNm: finalTorqueNmOf(setup),
      stageFractions: stageFractionsOf(setup),
      stagesGivenAs: setup.stageMode,
      confirmedFinalNm: setup.confirmDeviation ?? null,
    });
    return done(jobId, "torque", "Torque sheet ready: tick each bolt as you tighten it.");
  } catch (err) {
    return actionFailure(err);
  }
}

export async function saveTick(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:work");
    const jobId = jobIdSchema.parse(text(f, "jobId"));
    const tick = tickSchema.parse({ sheetId: text(f, "sheetId"), stage: text(f, "stage"), boltId: text(f, "boltId") });
    const next = await tickBolt(await getDb(), actor, { jobId, ...tick });
    return done(jobId, "torque", next ? `${tick.boltId} done. Next: ${next.boltId} at stage ${next.stage}.` : "Every bolt is tightened at every stage.");
  } catch (err) {
    return actionFailure(err);
  }
}

export async function undoLastTick(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:work");
    const jobId = jobIdSchema.parse(text(f, "jobId"));
    const undo = tickUndoSchema.parse({
      sheetId: text(f, "sheetId"),
      stage: text(f, "stage"),
      boltId: text(f, "boltId"),
      reason: text(f, "reason") ?? "",
    });
    const undone = await undoTick(await getDb(), actor, { jobId, ...undo });
    return done(jobId, "torque", `Tick undone: ${undone!.boltId} at stage ${undone!.stage} is to be tightened again.`);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function saveMeasurement(_prev: ActionState, f: FormData): Promise<ActionState<SavedMeasurement>> {
  try {
    const actor = await requireActor("jobs:work");
    const jobId = jobIdSchema.parse(text(f, "jobId"));
    const m = measurementSchema.parse({
      kind: text(f, "kind"),
      seatId: text(f, "seatId"),
      journalId: text(f, "journalId"),
      value: text(f, "value"),
      unit: text(f, "unit"),
      spec: { min: text(f, "specMin"), max: text(f, "specMax") },
      method: text(f, "method"),
    });
    if (m.kind === "journal_clearance") {
      return { ok: false, message: "Record journal clearances on the clearance sheet.", fieldErrors: { kind: ["Use the clearance sheet."] } };
    }
    const { note } = noteSchema.parse({ note: text(f, "note") ?? "" });
    const si = measurementSi(m);
    const result = await recordMeasurement(await getDb(), actor, {
      jobId,
      kind: m.kind,
      seatId: m.seatId ?? null,
      valueSi: si.value,
      enteredUnit: m.unit,
      method: m.method ?? null,
      spec: si.min !== null || si.max !== null ? { min: si.min, max: si.max } : null,
      note,
    });
    const replaced = result.replaced ? " It replaces the earlier reading, which the audit trail keeps." : "";
    return result.verdict
      ? saved(`Saved — ${RANGE_VERDICT_LABELS[result.verdict]}.${replaced}`, result.verdict === "within_spec" ? "ok" : "warn", result)
      : saved(`Saved (no specification to judge against).${replaced}`, "ok", result);
  } catch (err) {
    return actionFailure(err);
  }
}

/**
 * One seat's row of the measurement grid: every figure typed on it, saved together or not at all,
 * with every refused figure named at once. Field errors are keyed by the figure's kind.
 */
export async function saveSeatMeasurements(_prev: ActionState, f: FormData): Promise<ActionState<SavedMeasurement[]>> {
  try {
    const actor = await requireActor("jobs:work");
    const jobId = jobIdSchema.parse(text(f, "jobId"));
    const seatId = uuidText("Unknown seat.").parse(text(f, "seatId"));
    const fieldErrors: Record<string, string[]> = {};
    const parsed: Array<{ kind: (typeof GRID_KINDS)[number]; m: z.infer<typeof measurementSchema> }> = [];
    for (const kind of GRID_KINDS) {
      const value = text(f, kind);
      if (value === undefined || value.trim() === "") continue;
      const r = measurementSchema.safeParse({
        kind,
        seatId,
        value,
        unit: text(f, `${kind}.unit`) ?? MEASUREMENT_KINDS[kind].defaultUnit,
        method: kind === "stem_guide_clearance" ? text(f, "stemGuideMethod") : undefined,
      });
      if (r.success) parsed.push({ kind, m: r.data });
      else
        for (const issue of r.error.issues) {
          // The method belongs to the grid's column, the rest to the figure's own field.
          const key = issue.path[0] === "method" ? "stemGuideMethod" : kind;
          (fieldErrors[key] ??= []).push(issue.message);
        }
    }
    if (Object.keys(fieldErrors).length) {
      const n = Object.keys(fieldErrors).length;
      return { ok: false, message: n === 1 ? "Check the highlighted figure: nothing on this seat was saved." : `Check the ${n} highlighted figures: nothing on this seat was saved.`, fieldErrors };
    }
    if (!parsed.length) return { ok: false, message: "Type at least one figure for this seat before saving.", fieldErrors: {} };
    const results = await recordMeasurements(
      await getDb(),
      actor,
      jobId,
      parsed.map(({ kind, m }) => ({
        jobId,
        kind,
        seatId,
        valueSi: measurementSi(m).value,
        enteredUnit: m.unit,
        method: m.method ?? null,
        spec: null,
        note: null,
      })),
    );
    const out = results.filter((r) => r.verdict && r.verdict !== "within_spec");
    const replaced = results.some((r) => r.replaced) ? " Figures typed again replace the earlier readings (kept in the audit trail)." : "";
    const message = out.length
      ? `Saved ${results.length}; out of specification: ${out.map((r) => `${MEASUREMENT_KINDS[r.kind].label.toLowerCase()} ${RANGE_VERDICT_LABELS[r.verdict!].toLowerCase()}`).join(", ")}.${replaced}`
      : `Saved ${results.length}${results.every((r) => r.verdict) ? ", all within spec" : ""}.${replaced}`;
    return saved(message, out.length ? "warn" : "ok", results);
  } catch (err) {
    return actionFailure(err);
  }
}

const valveIdentitySchema = z.object({
  jobId: uuidText(),
  valveId: uuidText("Unknown valve."),
  tag: storableText(z.string().trim().min(1, "Give the valve a tag.").max(20, "Keep the tag under 20 characters.")),
  partNumber: storableText(z.string().trim().max(40, "Keep the part number under 40 characters.")).transform((v) => v || null),
  serial: storableText(z.string().trim().max(40, "Keep the serial under 40 characters.")).transform((v) => v || null),
});

export async function saveValveIdentity(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:work");
    const v = valveIdentitySchema.parse({
      jobId: text(f, "jobId"),
      valveId: text(f, "valveId"),
      tag: text(f, "tag") ?? "",
      partNumber: text(f, "partNumber") ?? "",
      serial: text(f, "serial") ?? "",
    });
    await updateValveIdentity(await getDb(), actor, v);
    return done(v.jobId, "valves", `Valve ${v.tag} saved.`);
  } catch (err) {
    const e = err as { code?: string; cause?: { code?: string } };
    if (e?.code === "23505" || e?.cause?.code === "23505") {
      return { ok: false, message: "Another valve of this head has that tag.", fieldErrors: { tag: ["Already used on this head."] } };
    }
    return actionFailure(err);
  }
}

const moveSchema = z.object({ jobId: uuidText(), valveId: uuidText("Unknown valve."), toSeatId: uuidText("Choose a seat.") });

export async function saveValveMove(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:work");
    const v = moveSchema.parse({ jobId: text(f, "jobId"), valveId: text(f, "valveId"), toSeatId: text(f, "toSeatId") });
    await moveValve(await getDb(), actor, v);
    return done(v.jobId, "valves", "Valve moved; the swap is recorded.");
  } catch (err) {
    return actionFailure(err);
  }
}
