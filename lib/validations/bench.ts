import { z } from "zod";
import { STROKE_FLAGS as ENGINE_STROKE_FLAGS } from "@/lib/audio/verdict";
import { storableText } from "./text";
import { uuidText } from "./ids";

export const stageSchema = z.enum(["coarse", "fine"], { error: "Stage must be coarse or fine." });

// The engine's flags, and one an earlier phone build could send; any flag
// leaves the stroke out of the verdict.
export const STROKE_FLAGS = [...ENGINE_STROKE_FLAGS, "speech-nearby"] as const;

/**
 * A figure stored in a single-precision (real) column: checked as it will be stored, rounded to
 * single precision (Math.fround), and passed on rounded, so that what the database is given is
 * exactly what was checked. A figure too small for single precision is stored as 0, as the
 * column would round it; PostgreSQL refuses such input rather than rounding it.
 */
const single = (name: string, unit: string, min: number, max: number, below: string, above: string) =>
  z
    .number({ error: (issue) => (issue.input === undefined ? `${name} is required.` : `${name} must be a number${unit}.`) })
    .finite(`${name} must be a finite number.`)
    // `|| 0`: -0 goes to the database as 0.
    .transform((v) => Math.fround(v) || 0)
    .pipe(z.number().min(min, below).max(max, above));

const level = (name: string) => single(name, " in dB", -200, 60, `${name} below -200 dB is not a level.`, `${name} above +60 dB is not a level.`);

export const strokeInputSchema = z
  .object({
    clientId: z.string({ error: "clientId is required." }).pipe(uuidText("clientId must be a UUID made on the phone.")),
    index: z.number({ error: "index is required." }).int("index must be a whole number.").min(1, "index starts at 1.").max(100_000),
    startS: single("startS", " of seconds", 0, 86_400, "startS cannot be negative.", "startS is more than a day into the session."),
    endS: single("endS", " of seconds", 0, 86_400, "endS cannot be negative.", "endS is more than a day into the session."),
    onsetDb: level("onsetDb"),
    bodyDb: level("bodyDb"),
    contrastDb: single("contrastDb", " in dB", -60, 60, "contrastDb below -60 dB is not plausible.", "contrastDb above 60 dB is not plausible."),
    // Older phone builds do not send it.
    bandSnrDb: single("bandSnrDb", " in dB", -100, 200, "bandSnrDb below -100 dB is not plausible.", "bandSnrDb above 200 dB is not plausible.")
      .nullable()
      .optional(),
    flags: z
      .array(z.enum(STROKE_FLAGS, { error: `Each flag must be one of: ${STROKE_FLAGS.join(", ")}.` }))
      .max(STROKE_FLAGS.length)
      .refine((f) => new Set(f).size === f.length, "flags must not repeat.")
      .default([]),
  })
  // Compared as stored: two times a few nanoseconds apart are one time in single precision.
  .refine((s) => s.endS > s.startS, { message: "endS must be after startS (as stored, to single precision).", path: ["endS"] });

export const strokeBatchSchema = z.object({
  strokes: z.array(strokeInputSchema).min(1, "Send at least one stroke.").max(500, "Send at most 500 strokes at once."),
});

export const startSessionSchema = z.object({
  sessionId: uuidText("sessionId must be a UUID made on the phone."),
  stage: stageSchema,
  deviceId: storableText(z.string().trim().min(8, "deviceId is too short.").max(100)),
  sampleRateHz: z.number().int().min(8000).max(192000).optional(),
  noiseFloorDb: z.number().finite().min(-200).max(0).optional(),
});

export type StrokeInput = z.infer<typeof strokeInputSchema>;
export type StartSessionInput = z.infer<typeof startSessionSchema>;
