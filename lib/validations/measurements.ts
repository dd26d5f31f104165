// The measurement sheets' zod schemas, shared by the forms and the server actions: journal
// clearance readings, clearance specifications, the other head measurements, the cap torque sheet
// and its ticks. Forms send strings, so number fields parse text themselves and say what is wrong.
import { z } from "zod";
import {
  clearanceFromDiameters,
  PLAUSIBLE_JOURNAL_DIAMETER_MM,
  STRIP_IDS,
  type ClearanceSpec,
} from "@/lib/measure/clearance";
import {
  MEASUREMENT_KIND_IDS,
  MEASUREMENT_KINDS,
  STEM_GUIDE_METHODS,
  type MeasurementKind,
} from "@/lib/measure/results";
import {
  DEFAULT_STAGE_FRACTIONS,
  fractionsOfStageTorques,
  MAX_CAPS,
  MAX_STAGES,
  PLAUSIBLE_CAP_TORQUE_NM,
  stageFractionsProblem,
  validateOrder,
  type BoltsPerCap,
} from "@/lib/measure/torque";
import { uuidText } from "./ids";
import {
  FORCE_UNITS,
  isForceUnit,
  isLengthUnit,
  LENGTH_UNITS,
  lengthUnitSchema,
  toMm,
  toN,
  toNm,
  torqueUnitSchema,
  UNIT_LABELS,
  type ForceUnit,
  type LengthUnit,
} from "@/lib/measure/units";
import { storableText } from "./text";

// Plain decimals only, with a point or a comma (workshops type both). No exponents, hex or
// thousands separators: on a measurement sheet those are slips, not numbers.
const DECIMAL_TEXT = /^[+-]?(\d+([.,]\d*)?|[.,]\d+)$/;

function numberFromInput(v: unknown): unknown {
  if (v === null) return undefined;
  if (typeof v !== "string") return v;
  const t = v.trim();
  if (t === "") return undefined;
  return DECIMAL_TEXT.test(t) ? Number(t.replace(",", ".")) : Number.NaN;
}

const blankToUndefined = (v: unknown) =>
  v === null || (typeof v === "string" && v.trim() === "") ? undefined : v;

/**
 * Each field says what it wants in its own terms: the example is a figure of that field's kind
 * (a clearance, a diameter, a count), never another field's.
 */
const numberError = (what: string, example?: string, as = "a number") => (iss: { input?: unknown }) =>
  iss.input === undefined
    ? `Enter ${what}.`
    : example
      ? `Enter ${what} as ${as}, like ${example}.`
      : `Enter ${what} as a plain number: digits with one decimal point or comma.`;

/** A measured value: a number, zero or more. */
const measuredNumber = (what: string, example?: string) =>
  z.preprocess(
    numberFromInput,
    z.number({ error: numberError(what, example) }).min(0, "A measurement cannot be negative."),
  );

const optionalMeasuredNumber = (what: string, example?: string) =>
  z.preprocess(
    numberFromInput,
    z
      .number({ error: numberError(what, example) })
      .min(0, "A measurement cannot be negative.")
      .optional(),
  );

const wholeNumber = (what: string, min: number, max: number, range: string, example: string) =>
  z.preprocess(
    numberFromInput,
    z
      .number({ error: numberError(what, example, "a whole number") })
      .int(`Enter ${what} as a whole number, like ${example}.`)
      .min(min, range)
      .max(max, range),
  );

const uuidField = (what: string) =>
  z.string({ error: `Choose ${what}.` }).pipe(uuidText(`Unknown ${what.replace(/^(the|a) /, "")}.`));

const optionalUuidField = (what: string) =>
  z.preprocess(blankToUndefined, uuidField(what).optional());

const fmt = (n: number) => String(Number(n.toPrecision(6)));

/** Runs a cross-field check only once the fields it reads have parsed, so each message is about one real problem. */
const whenValid =
  (...keys: string[]) =>
  (payload: z.core.ParsePayload) =>
    !payload.issues.some((i) => !i.path?.length || keys.includes(String(i.path[0])));

function plausibility(
  kind: MeasurementKind,
  valueSi: number,
  typed: number,
  unit: string,
): string | null {
  const info = MEASUREMENT_KINDS[kind];
  const { min, max } = info.plausibleSi;
  if (valueSi >= min && valueSi <= max) return null;
  const si = info.quantity === "length" ? "mm" : "N";
  return `${fmt(typed)} ${UNIT_LABELS[unit as LengthUnit | ForceUnit] ?? unit} is not a plausible ${info.label.toLowerCase()} (${fmt(min)}–${fmt(max)} ${si}): check the value and its unit.`;
}

export const stripIdSchema = z.enum(STRIP_IDS, {
  error: "Choose the gauge strip used: narrow or wide.",
});

// ——— Journal clearance reading ———

const stripReadingSchema = z.object({
  journalId: uuidField("the journal"),
  method: z.literal("strip"),
  stripId: stripIdSchema,
  value: measuredNumber("the strip reading", "0.051"),
  unit: lengthUnitSchema,
});

const diametersReadingSchema = z.object({
  journalId: uuidField("the journal"),
  method: z.literal("diameters"),
  boreValue: measuredNumber("the bore diameter", "26.000"),
  journalValue: measuredNumber("the journal diameter", "25.949"),
  unit: lengthUnitSchema,
});

export const journalClearanceReadingSchema = z
  .discriminatedUnion("method", [stripReadingSchema, diametersReadingSchema], {
    error: "Choose how the clearance was measured: gauge strip or bore and journal diameters.",
  })
  .superRefine(
    (r, ctx) => {
      if (r.method === "strip") {
        const problem = plausibility("journal_clearance", toMm(r.value, r.unit), r.value, r.unit);
        if (problem) ctx.addIssue({ code: "custom", path: ["value"], message: problem });
        return;
      }
      const dia = PLAUSIBLE_JOURNAL_DIAMETER_MM;
      const bounds = `${dia.min}–${dia.max} mm`;
      const bore = toMm(r.boreValue, r.unit);
      const journal = toMm(r.journalValue, r.unit);
      let diametersOk = true;
      for (const [path, mm, typed, what] of [
        ["boreValue", bore, r.boreValue, "bore"],
        ["journalValue", journal, r.journalValue, "journal"],
      ] as const) {
        if (mm < dia.min || mm > dia.max) {
          diametersOk = false;
          ctx.addIssue({
            code: "custom",
            path: [path],
            message: `${fmt(typed)} ${UNIT_LABELS[r.unit]} is not a plausible camshaft ${what} diameter (${bounds}): check the value and its unit.`,
          });
        }
      }
      if (!diametersOk) return;
      if (journal > bore) {
        ctx.addIssue({
          code: "custom",
          path: ["journalValue"],
          message:
            "The journal cannot be larger than its bore: re-measure both, on the same journal.",
        });
        return;
      }
      const clearance = clearanceFromDiameters(bore, journal);
      const { max } = MEASUREMENT_KINDS.journal_clearance.plausibleSi;
      if (clearance > max)
        ctx.addIssue({
          code: "custom",
          path: ["journalValue"],
          message: `Bore minus journal gives ${fmt(clearance)} mm, more than a plausible oil clearance (up to ${max} mm): check both diameters.`,
        });
    },
    { when: whenValid("method", "value", "unit", "boreValue", "journalValue") },
  );

export type JournalClearanceReading = z.infer<typeof journalClearanceReadingSchema>;
export type JournalClearanceReadingForm = z.input<typeof journalClearanceReadingSchema>;

/** The reading as a clearance in mm, whichever way it was measured. */
export function clearanceMmOf(reading: JournalClearanceReading): number {
  return reading.method === "strip"
    ? toMm(reading.value, reading.unit)
    : clearanceFromDiameters(
        toMm(reading.boreValue, reading.unit),
        toMm(reading.journalValue, reading.unit),
      );
}

// ——— Clearance specification ———

export const clearanceSpecSchema = z
  .object({
    min: measuredNumber("the minimum clearance", "0.040"),
    max: measuredNumber("the maximum clearance", "0.080"),
    serviceLimit: optionalMeasuredNumber("the service limit", "0.120"),
    unit: lengthUnitSchema,
  })
  .superRefine(
    (s, ctx) => {
      for (const key of ["min", "max", "serviceLimit"] as const) {
        const v = s[key];
        if (v === undefined) continue;
        const problem = plausibility("journal_clearance", toMm(v, s.unit), v, s.unit);
        if (problem) ctx.addIssue({ code: "custom", path: [key], message: problem });
      }
      if (s.min > s.max)
        ctx.addIssue({
          code: "custom",
          path: ["max"],
          message: "The maximum is below the minimum: check the two values.",
        });
      if (s.serviceLimit !== undefined && s.serviceLimit < s.max)
        ctx.addIssue({
          code: "custom",
          path: ["serviceLimit"],
          message:
            "The service limit must be at or above the maximum: it is the wear at which the part is replaced.",
        });
    },
    { when: whenValid("min", "max", "serviceLimit", "unit") },
  );

export type ClearanceSpecInput = z.infer<typeof clearanceSpecSchema>;

export function clearanceSpecMm(spec: ClearanceSpecInput): ClearanceSpec {
  return {
    minMm: toMm(spec.min, spec.unit),
    maxMm: toMm(spec.max, spec.unit),
    serviceLimitMm: spec.serviceLimit === undefined ? null : toMm(spec.serviceLimit, spec.unit),
  };
}

// ——— Other head measurements ———

const measurementUnitSchema = z.enum([...LENGTH_UNITS, ...FORCE_UNITS], {
  error: "Choose a unit: mm, in or µm for lengths; N, lbf or kgf for spring loads.",
});

export const measurementSchema = z
  .object({
    kind: z.enum(MEASUREMENT_KIND_IDS, { error: "Choose what was measured." }),
    seatId: optionalUuidField("the seat"),
    journalId: optionalUuidField("the journal"),
    value: measuredNumber("the measurement"),
    /** The unit of the value and of the specification. */
    unit: measurementUnitSchema,
    spec: z
      .object({
        min: optionalMeasuredNumber("the specification's minimum"),
        max: optionalMeasuredNumber("the specification's maximum"),
      })
      // A form sends both ends blank for "no specification": that is no spec, not an empty one.
      .transform((s) => (s.min === undefined && s.max === undefined ? undefined : s))
      .optional(),
    method: z.preprocess(
      blankToUndefined,
      z.enum(STEM_GUIDE_METHODS, { error: "Choose the method: direct or rocking." }).optional(),
    ),
  })
  .superRefine(
    (m, ctx) => {
      const info = MEASUREMENT_KINDS[m.kind];
      const issue = (path: string, message: string) =>
        ctx.addIssue({ code: "custom", path: [path], message });

      if (info.scope === "seat" && !m.seatId)
        issue("seatId", `Choose the seat this ${info.label.toLowerCase()} belongs to.`);
      if (info.scope !== "seat" && m.seatId)
        issue("seatId", `${info.label} is not recorded per seat.`);
      if (info.scope === "journal" && !m.journalId) issue("journalId", "Choose the journal.");
      if (info.scope !== "journal" && m.journalId)
        issue("journalId", `${info.label} is not recorded per journal.`);

      // The rocking method reads larger than the direct one, so a value without its method cannot be judged.
      if (m.kind === "stem_guide_clearance" && !m.method)
        issue(
          "method",
          "Choose how it was measured: direct (bore gauge minus stem) or rocking (dial indicator).",
        );
      if (m.kind !== "stem_guide_clearance" && m.method)
        issue("method", `${info.label} has no method to choose.`);

      const toSi = (v: number): number | null =>
        info.quantity === "length"
          ? isLengthUnit(m.unit)
            ? toMm(v, m.unit)
            : null
          : isForceUnit(m.unit)
            ? toN(v, m.unit)
            : null;
      if (toSi(m.value) === null) {
        issue(
          "unit",
          info.quantity === "length"
            ? `${info.label} is a length: choose mm, in or µm.`
            : `${info.label} is a force: choose N, lbf or kgf.`,
        );
        return;
      }
      const problem = plausibility(m.kind, toSi(m.value)!, m.value, m.unit);
      if (problem) issue("value", problem);

      if (m.spec) {
        for (const key of ["min", "max"] as const) {
          const v = m.spec[key];
          if (v === undefined) continue;
          const p = plausibility(m.kind, toSi(v)!, v, m.unit);
          if (p) ctx.addIssue({ code: "custom", path: ["spec", key], message: p });
        }
        if (m.spec.min !== undefined && m.spec.max !== undefined && m.spec.min > m.spec.max)
          ctx.addIssue({
            code: "custom",
            path: ["spec", "max"],
            message: "The maximum is below the minimum: check the two values.",
          });
      }
    },
    { when: whenValid("kind", "seatId", "journalId", "value", "unit", "spec", "method") },
  );

export type MeasurementInput = z.infer<typeof measurementSchema>;
export type MeasurementForm = z.input<typeof measurementSchema>;

/** A measurement's value, and its spec ends, in SI (mm or N) for judging and storing. */
export function measurementSi(m: MeasurementInput): {
  value: number;
  min: number | null;
  max: number | null;
} {
  const conv = (v: number) =>
    isLengthUnit(m.unit) ? toMm(v, m.unit) : toN(v, m.unit as ForceUnit);
  return {
    value: conv(m.value),
    min: m.spec?.min === undefined ? null : conv(m.spec.min),
    max: m.spec?.max === undefined ? null : conv(m.spec.max),
  };
}

// ——— Cap torque sheet ———

const BOLT_ID = /^C([1-9]\d?)(-[LR])?$/;

function orderFromInput(v: unknown): unknown {
  const clean = (s: unknown) => (typeof s === "string" ? s.trim().toUpperCase() : s);
  if (typeof v === "string") {
    const t = v.trim();
    if (t.toLowerCase() === "centre-out") return "centre-out";
    // A typed list, as read off the maker's figure: "C3-L, C3-R, C2-L …".
    return t === "" ? [] : t.split(/[\s,;]+/).map(clean);
  }
  return Array.isArray(v) ? v.map(clean) : v;
}

function fractionsFromInput(v: unknown): unknown {
  if (v === undefined || v === null || (typeof v === "string" && v.trim() === "")) return undefined;
  // A typed list such as "0.3, 0.6, 1": here a comma separates stages, so decimals take a point.
  return typeof v === "string" ? v.split(/[\s,;]+/).filter(Boolean) : v;
}

export const torqueSheetSetupSchema = z
  .object({
    camshaftId: uuidField("the camshaft"),
    capCount: wholeNumber(
      "the number of caps",
      1,
      MAX_CAPS,
      `A camshaft has between 1 and ${MAX_CAPS} caps.`,
      "5",
    ),
    boltsPerCap: z.preprocess(
      numberFromInput,
      z.union([z.literal(1), z.literal(2)], { error: "A cap has 1 or 2 bolts." }),
    ),
    order: z.preprocess(
      orderFromInput,
      z.union([z.literal("centre-out"), z.array(z.string()).min(1, "List every bolt in order.")], {
        error: 'Choose "centre-out" or list the bolts in the engine maker\'s order.',
      }),
    ),
    finalTorque: z.object({
      value: z.preprocess(
        numberFromInput,
        z
          .number({ error: numberError("the final torque") })
          .positive("The final torque must be above zero."),
      ),
      unit: torqueUnitSchema,
    }),
    stageFractions: z.preprocess(
      fractionsFromInput,
      z
        .array(
          z.preprocess(
            numberFromInput,
            z.number({ error: "Each stage is a number, like 0.3 for 30%." }),
          ),
        )
        .default([...DEFAULT_STAGE_FRACTIONS]),
    ),
    /** "torques": the stages before the final are given as torques, in the final torque's unit. */
    stageMode: z.preprocess(
      blankToUndefined,
      z
        .enum(["fractions", "torques"], {
          error: "Choose how the stages are given: as shares of the final or as torques.",
        })
        .default("fractions"),
    ),
    stageTorques: z.preprocess(
      fractionsFromInput,
      z
        .array(
          z.preprocess(
            numberFromInput,
            z.number({ error: "Each stage is a torque, like 4 (decimals take a point)." }),
          ),
        )
        .optional(),
    ),
    /** The final torque in N·m the technician confirmed against the specification, when it strays from it. */
    confirmDeviation: z.preprocess(
      numberFromInput,
      z.number({ error: "Confirm the final torque by its figure in N·m." }).optional(),
    ),
  })
  .superRefine(
    (s, ctx) => {
      const { min, max } = PLAUSIBLE_CAP_TORQUE_NM;
      const nm = toNm(s.finalTorque.value, s.finalTorque.unit);
      if (nm < min || nm > max)
        ctx.addIssue({
          code: "custom",
          path: ["finalTorque", "value"],
          message: `${fmt(s.finalTorque.value)} ${UNIT_LABELS[s.finalTorque.unit]} is not a plausible cap bolt torque (${min}–${max} N·m): check the value and its unit.`,
        });
      if (s.stageMode === "torques") {
        const problem = stageTorquesProblem(s.stageTorques ?? [], s.finalTorque.value);
        if (problem) ctx.addIssue({ code: "custom", path: ["stageTorques"], message: problem });
      } else {
        const problem = stageFractionsProblem(s.stageFractions);
        if (problem) ctx.addIssue({ code: "custom", path: ["stageFractions"], message: problem });
      }
      if (s.order !== "centre-out") {
        for (const message of validateOrder(s.order, s.capCount, s.boltsPerCap))
          ctx.addIssue({ code: "custom", path: ["order"], message });
      }
    },
    {
      when: whenValid(
        "capCount",
        "boltsPerCap",
        "order",
        "finalTorque",
        "stageFractions",
        "stageMode",
        "stageTorques",
      ),
    },
  );

/** The stages before the final as typed; a last figure equal to the final is the final itself. */
function earlierStages(torques: readonly number[], final: number): number[] {
  return torques.length && torques[torques.length - 1] === final ? torques.slice(0, -1) : [...torques];
}

function stageTorquesProblem(torques: readonly number[], final: number): string | null {
  const earlier = earlierStages(torques, final);
  if (earlier.length < 1)
    return "List the torques of the stages before the final one, like 4 (or 4, 7) for a final of 10.";
  if (earlier.length > MAX_STAGES - 1) return `Use between 1 and ${MAX_STAGES} stages in all.`;
  if (earlier.some((t) => !Number.isFinite(t) || t <= 0))
    return "Every stage needs a torque above zero.";
  const all = [...earlier, final];
  for (let i = 1; i < all.length; i++)
    if (!(all[i]! > all[i - 1]!))
      return "Each stage must be tighter than the one before, and every one below the final torque.";
  return null;
}

export type TorqueSheetSetup = z.infer<typeof torqueSheetSetupSchema>;
export type TorqueSheetSetupForm = z.input<typeof torqueSheetSetupSchema>;

export function finalTorqueNmOf(setup: TorqueSheetSetup): number {
  return toNm(setup.finalTorque.value, setup.finalTorque.unit);
}

/** The sheet's stages as shares of the final, however they were given. */
export function stageFractionsOf(setup: TorqueSheetSetup): number[] {
  if (setup.stageMode !== "torques") return setup.stageFractions;
  const final = setup.finalTorque.value;
  return fractionsOfStageTorques([...earlierStages(setup.stageTorques ?? [], final), final]);
}

export const tickSchema = z.object({
  sheetId: uuidField("the torque sheet"),
  stage: wholeNumber("the stage", 1, MAX_STAGES, `Stages run from 1 to ${MAX_STAGES}.`, "2"),
  boltId: z.preprocess(
    (v) => (typeof v === "string" ? v.trim().toUpperCase() : v),
    z
      .string({ error: "Choose the bolt." })
      .regex(BOLT_ID, "Unknown bolt: bolts are named like C3-L, C3-R or C3.")
      .refine(
        (id) => Number(BOLT_ID.exec(id)?.[1]) <= MAX_CAPS,
        `A camshaft has at most ${MAX_CAPS} caps.`,
      ),
  ),
});

export type TickInput = z.infer<typeof tickSchema>;

/** Undoing a mistaken tick names the tick and says why; the reason goes into the audit trail. */
export const tickUndoSchema = tickSchema.extend({
  reason: storableText(
    z
      .string({ error: "Say why the tick is undone." })
      .trim()
      .min(3, "Say why the tick is undone, in at least 3 characters (e.g. ticked the wrong bolt).")
      .max(300, "Keep the reason under 300 characters."),
  ),
});

export type { BoltsPerCap };
