// Specifications library and job overrides: one figure at a time, typed in any unit of its
// quantity and stored in SI beside what was typed.
import { z } from "zod";
import type { EnteredFigures } from "@/db/schema";
import { SPEC_KEY_LIST, SPEC_KEYS } from "@/lib/specs/keys";
import {
  SI_CEILING,
  SI_UNIT,
  SPEC_UNITS,
  formatSi,
  toSi,
  unitFits,
  unitLabel,
  type SpecUnit,
} from "@/lib/specs/units";
import { storableText } from "./text";

const FIELD_WORDS = {
  min: "minimum",
  max: "maximum",
  limit: "service limit",
  nominal: "value",
} as const;
const FIGURE_FIELDS = ["min", "max", "limit", "nominal"] as const;
type FigureField = (typeof FIGURE_FIELDS)[number];

const PLAIN_DECIMAL = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;

/** A figure as typed: empty is "not given"; a decimal comma is read as a point. */
const optionalNumber = (label: string) =>
  z.preprocess(
    (v) => (typeof v === "string" ? (v.trim() === "" ? undefined : v.trim().replace(",", ".")) : v),
    z
      .string({ error: `Enter the ${label} as a number.` })
      .regex(PLAIN_DECIMAL, `Enter the ${label} as a number, like 0.05.`)
      .max(20, `Enter the ${label} as a number, like 0.05.`)
      .refine((t) => !/^-\s*\d*\.?\d*[1-9]/.test(t), `The ${label} cannot be negative.`)
      .optional(),
  );

/**
 * One figure of an engine or a job, typed in any unit of its quantity (a manual in inches or
 * lbf·ft). What comes out is in SI (mm, N·m, N) for storing and judging, with the unit and the
 * figures as typed, to show them as the manual gives them.
 */
export const specFigureSchema = z
  .object({
    key: z.enum(SPEC_KEY_LIST as [string, ...string[]], { error: "Choose which figure this is." }),
    unit: z.preprocess(
      (v) => (v === undefined || v === null || v === "" ? undefined : v),
      z.string({ error: "Choose a unit." }).max(10, "Choose a unit from the list.").optional(),
    ),
    min: optionalNumber(FIELD_WORDS.min),
    max: optionalNumber(FIELD_WORDS.max),
    limit: optionalNumber(FIELD_WORDS.limit),
    nominal: optionalNumber(FIELD_WORDS.nominal),
    note: storableText(z.string().trim().max(300, "Keep the note under 300 characters.")).default(
      "",
    ),
  })
  .superRefine((s, ctx) => {
    const info = SPEC_KEYS[s.key as keyof typeof SPEC_KEYS];
    const unit = s.unit ?? SI_UNIT[info.quantity];
    if (!unitFits(info.quantity, unit)) {
      ctx.addIssue({
        code: "custom",
        path: ["unit"],
        message: `${info.label} is a ${info.quantity}: choose ${SPEC_UNITS[info.quantity].map(unitLabel).join(", ")}.`,
      });
      return;
    }
    const given = FIGURE_FIELDS.filter((f) => s[f] !== undefined);
    if (given.length === 0)
      ctx.addIssue({
        code: "custom",
        path: [info.fields[0]],
        message: "Enter at least one value.",
      });
    for (const f of given) {
      if (!(info.fields as readonly string[]).includes(f)) {
        ctx.addIssue({
          code: "custom",
          path: [f],
          message: `${info.label} has no ${f === "nominal" ? "single value" : FIELD_WORDS[f]}.`,
        });
      }
    }
    // A field that failed its own check (not a number) is left to its own message.
    const si = (f: FigureField) => {
      const n = s[f] !== undefined && PLAIN_DECIMAL.test(s[f]) ? Number(s[f]) : NaN;
      return Number.isFinite(n) && n >= 0 ? toSi(info.quantity, n, unit) : undefined;
    };
    for (const f of given.filter((g) => si(g) !== undefined)) {
      const v = si(f)!;
      if (v > SI_CEILING[info.quantity]) {
        ctx.addIssue({
          code: "custom",
          path: [f],
          message: `${s[f]} ${unitLabel(unit)} is ${formatSi(info.quantity, v)}: far too large for this figure. Check the unit and the decimal point.`,
        });
      }
    }
    const [min, max, limit] = [si("min"), si("max"), si("limit")];
    if (min !== undefined && max !== undefined && min > max) {
      ctx.addIssue({ code: "custom", path: ["max"], message: "The maximum is below the minimum." });
    }
    if (limit !== undefined && max !== undefined && limit < max) {
      ctx.addIssue({
        code: "custom",
        path: ["limit"],
        message: "The service limit must be at or above the maximum.",
      });
    }
  })
  .transform((s) => {
    const info = SPEC_KEYS[s.key as keyof typeof SPEC_KEYS];
    const unit = (s.unit ?? SI_UNIT[info.quantity]) as SpecUnit;
    const si = (f: FigureField) =>
      s[f] === undefined ? undefined : toSi(info.quantity, Number(s[f]), unit);
    const entered: EnteredFigures = {};
    for (const f of FIGURE_FIELDS) if (s[f] !== undefined) entered[f] = s[f];
    return {
      key: s.key,
      unit,
      min: si("min"),
      max: si("max"),
      limit: si("limit"),
      nominal: si("nominal"),
      entered,
      note: s.note,
    };
  });

export type SpecFigure = z.output<typeof specFigureSchema>;

export const engineSpecSchema = z.object({
  name: storableText(
    z
      .string()
      .trim()
      .min(3, "Name the engine (make, model, size).")
      .max(120, "Keep the name under 120 characters."),
  ),
  source: storableText(z.string().trim().max(200, "Keep the source under 200 characters.")).default(
    "",
  ),
});

export const renameEngineSpecSchema = z.object({
  id: z.string().uuid("Unknown engine."),
  name: engineSpecSchema.shape.name,
});

export const retireEngineSpecSchema = z.object({
  id: z.string().uuid("Unknown engine."),
  retired: z
    .enum(["true", "false"], { error: "Choose whether the engine is retired." })
    .transform((v) => v === "true"),
});
