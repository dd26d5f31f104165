// The done-check form: which seat, which check, pass or fail, an optional note and photo. Shared
// by the server action and the tests; the words are the ones the bench screen shows.
import { z } from "zod";
import { DONE_CHECK_KINDS, DONE_CHECK_RESULTS } from "@/lib/bench/done-check-words";
import { uuidText } from "./ids";
import { storableText } from "./text";

export { DONE_CHECK_KINDS, DONE_CHECK_RESULTS, type DoneCheckKind, type DoneCheckResult } from "@/lib/bench/done-check-words";

export const NOTE_MAX = 500;

/** An empty field is no value at all. */
export const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

export const doneCheckSchema = z.object({
  seatId: uuidText("Unknown seat."),
  kind: z.enum(DONE_CHECK_KINDS, { error: "Choose the contact ring, the marking-compound test or the leak test." }),
  result: z.enum(DONE_CHECK_RESULTS, { error: "Choose pass or fail." }),
  note: z.preprocess(
    blankToUndefined,
    storableText(z.string({ error: "The note must be text." }).trim().max(NOTE_MAX, `Keep the note under ${NOTE_MAX} characters.`)).optional(),
  ),
  photoId: z.preprocess(blankToUndefined, uuidText("That photo is not one of this seat's.").optional()),
});

export type DoneCheckInput = z.infer<typeof doneCheckSchema>;

/** The reason a supervisor gives for approving a seat whose done-checks are not all passed. */
export const checksReasonSchema = z.preprocess(
  blankToUndefined,
  storableText(
    z
      .string({ error: "The reason must be text." })
      .trim()
      .min(3, "Give a reason of at least 3 characters: why the seat is approved without its done-checks.")
      .max(2000, "Keep the reason under 2000 characters."),
  ).optional(),
);
