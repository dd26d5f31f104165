import { z } from "zod";
import { STROKE_FLAGS as ENGINE_STROKE_FLAGS } from "@/lib/audio/verdict";
import { storableText } from "./text";

export const stageSchema = z.enum(["coarse", "fine"], { error: "Stage must be coarse or fine." });

// The engine's flags, and one an earlier phone build could send; any flag
// leaves the stroke out of the verdict.
export const STROKE_FLAGS = [...ENGINE_STROKE_FLAGS, "speech-nearby"] as const;

const db = (name: string) =>
  z
    .number({ error: `${name} must be a number in dB.` })
    .finite(`${name} must be a finite number.`)
    .min(-200, `${name} below -200 dB is not a level.`)
    .max(60, `${name} above +60 dB is not a level.`);

export const strokeInputSchema = z
  .object({
    clientId: z.string({ error: "clientId is required." }).uuid("clientId must be a UUID made on the phone."),
    index: z.number({ error: "index is required." }).int("index must be a whole number.").min(1, "index starts at 1.").max(100_000),
    startS: z.number({ error: "startS is required." }).finite().min(0, "startS cannot be negative.").max(86_400),
    endS: z.number({ error: "endS is required." }).finite().max(86_400),
    onsetDb: db("onsetDb"),
    bodyDb: db("bodyDb"),
    contrastDb: z
      .number({ error: "contrastDb is required." })
      .finite("contrastDb must be finite.")
      .min(-60, "contrastDb below -60 dB is not plausible.")
      .max(60, "contrastDb above 60 dB is not plausible."),
    flags: z
      .array(z.enum(STROKE_FLAGS, { error: `Each flag must be one of: ${STROKE_FLAGS.join(", ")}.` }))
      .max(STROKE_FLAGS.length)
      .refine((f) => new Set(f).size === f.length, "flags must not repeat.")
      .default([]),
  })
  .refine((s) => s.endS > s.startS, { message: "endS must be after startS.", path: ["endS"] });

export const strokeBatchSchema = z.object({
  strokes: z.array(strokeInputSchema).min(1, "Send at least one stroke.").max(500, "Send at most 500 strokes at once."),
});

export const startSessionSchema = z.object({
  sessionId: z.string().uuid("sessionId must be a UUID made on the phone."),
  stage: stageSchema,
  deviceId: storableText(z.string().trim().min(8, "deviceId is too short.").max(100)),
  sampleRateHz: z.number().int().min(8000).max(192000).optional(),
  noiseFloorDb: z.number().finite().min(-200).max(0).optional(),
});

export type StrokeInput = z.infer<typeof strokeInputSchema>;
export type StartSessionInput = z.infer<typeof startSessionSchema>;
