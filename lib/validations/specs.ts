// Specifications library and job overrides: one figure at a time, in the key's SI unit.
import { z } from "zod";
import { SPEC_KEY_LIST, SPEC_KEYS } from "@/lib/specs/keys";
import { storableText } from "./text";

const optionalNumber = (label: string) =>
  z.preprocess(
    (v) => (typeof v === "string" ? (v.trim() === "" ? undefined : Number(v.trim().replace(",", "."))) : v),
    z
      .number({ error: `Enter the ${label} as a number.` })
      .finite(`Enter the ${label} as a number.`)
      .nonnegative(`The ${label} cannot be negative.`)
      .max(2000, `The ${label} is far too large: check the unit.`)
      .optional(),
  );

export const specFigureSchema = z
  .object({
    key: z.enum(SPEC_KEY_LIST as [string, ...string[]], { error: "Choose which figure this is." }),
    min: optionalNumber("minimum"),
    max: optionalNumber("maximum"),
    limit: optionalNumber("service limit"),
    nominal: optionalNumber("value"),
    note: storableText(z.string().trim().max(300, "Keep the note under 300 characters.")).default(""),
  })
  .superRefine((s, ctx) => {
    const info = SPEC_KEYS[s.key as keyof typeof SPEC_KEYS];
    const given = (["min", "max", "limit", "nominal"] as const).filter((f) => s[f] !== undefined);
    if (given.length === 0) ctx.addIssue({ code: "custom", path: ["min"], message: "Enter at least one value." });
    for (const f of given) {
      if (!(info.fields as readonly string[]).includes(f)) {
        ctx.addIssue({ code: "custom", path: [f], message: `${info.label} has no ${f === "nominal" ? "single value" : f}.` });
      }
    }
    if (s.min !== undefined && s.max !== undefined && s.min > s.max) {
      ctx.addIssue({ code: "custom", path: ["max"], message: "The maximum is below the minimum." });
    }
    if (s.limit !== undefined && s.max !== undefined && s.limit < s.max) {
      ctx.addIssue({ code: "custom", path: ["limit"], message: "The service limit must be at or above the maximum." });
    }
    if (info.quantity === "length" && [s.min, s.max, s.limit, s.nominal].some((v) => v !== undefined && v > 100)) {
      ctx.addIssue({ code: "custom", path: ["max"], message: "Lengths are in mm here: that value is too large." });
    }
  });

export const engineSpecSchema = z.object({
  name: storableText(z.string().trim().min(3, "Name the engine (make, model, size).").max(120, "Keep the name under 120 characters.")),
  source: storableText(z.string().trim().max(200, "Keep the source under 200 characters.")).default(""),
});
