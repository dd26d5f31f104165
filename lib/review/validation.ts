// The review forms' shapes, shared by the actions and the JSON route alike.
import { z } from "zod";
import { DATE_RANGE_MESSAGE, isCalendarDate, isDateInRange, storableText } from "@/lib/validations/text";
import { uuidText } from "@/lib/validations/ids";
import { blankToUndefined, checksReasonSchema } from "@/lib/validations/done-checks";

const comment = storableText(
  z
    .string({ error: "Write a comment." })
    .trim()
    .min(3, "Write at least 3 characters: what you checked, or what to redo.")
    .max(2000, "Keep the comment under 2000 characters."),
);

const reason = storableText(
  z
    .string({ error: "Give a reason for reopening." })
    .trim()
    .min(3, "Give a reason of at least 3 characters: why this is being reopened.")
    .max(2000, "Keep the reason under 2000 characters."),
);

const decision = z.enum(["approved", "sent_back"], { error: "Choose approve or send back." });

/** An empty field is no value at all. */

/** A seat's comment: optional to approve, required to send back (checked on the whole form). */
const seatCommentField = z.preprocess(blankToUndefined, comment.optional());

const SEND_BACK_NEEDS_COMMENT = "Write what to redo: a seat is sent back with a comment.";

export const seatReviewSchema = z
  .object({
    seatId: uuidText("Unknown seat."),
    jobId: uuidText("Unknown job."),
    decision,
    comment: seatCommentField,
    // Required by the service when the seat's done-checks are not all passed.
    checksReason: checksReasonSchema,
    // The seat's state as the page showed it; a seat changed meanwhile answers a conflict.
    expectedState: z.preprocess(
      blankToUndefined,
      z.enum(["waiting", "lapping", "settled", "stalled", "approved", "sent_back"], { error: "Unknown seat state." }).optional(),
    ),
  })
  .refine((v) => v.decision !== "sent_back" || Boolean(v.comment), { message: SEND_BACK_NEEDS_COMMENT, path: ["comment"] });

/** "Approve every settled seat" on the job page: the seats shown, one optional comment, an optional checks reason. */
export const approveSettledSchema = z.object({
  jobId: uuidText("Unknown job."),
  seatIds: z
    .array(uuidText("Unknown seat."), { error: "Choose the seats to approve." })
    .min(1, "There is no settled seat to approve on this head.")
    .max(64, "A head has at most 64 seats."),
  comment: seatCommentField,
  checksReason: checksReasonSchema,
});
export const seatReopenSchema = z.object({ seatId: uuidText("Unknown seat."), jobId: uuidText("Unknown job."), reason });
// Required by the service when the head's record is incomplete (lib/review/completeness.ts).
const incompleteReason = z.preprocess(
  blankToUndefined,
  storableText(
    z
      .string({ error: "The reason must be text." })
      .trim()
      .min(3, "Give a reason of at least 3 characters: why the head is signed off with its record incomplete.")
      .max(2000, "Keep the reason under 2000 characters."),
  ).optional(),
);
export const headReviewSchema = z.object({ jobId: uuidText("Unknown job."), decision, comment, incompleteReason });
export const customerLinkRevokeSchema = z.object({ linkId: uuidText("Unknown link."), jobId: uuidText("Unknown job.") });
export const headReopenSchema = z.object({ jobId: uuidText("Unknown job."), reason });

const optionalUuid = (what: string) =>
  z
    .string()
    .trim()
    .optional()
    .transform((v) => (v ? v : undefined))
    .pipe(z.string().uuid(`That is not a ${what} of this shop: choose one from the list.`).optional());

const optionalDay = z
  .string()
  .trim()
  .optional()
  .transform((v) => (v ? v : undefined))
  .pipe(
    z
      .string()
      .regex(/^\d{4}-\d{2}-\d{2}$/, { message: "Use a date like 2026-03-14.", abort: true })
      .refine(isCalendarDate, { message: "That day is not on the calendar.", abort: true })
      .refine(isDateInRange, DATE_RANGE_MESSAGE)
      .optional(),
  );

/** The audit trail's filters, from a page's searchParams or a route's query string. */
export const auditFilterSchema = z
  .object({
    job: optionalUuid("job"),
    person: optionalUuid("person"),
    from: optionalDay,
    to: optionalDay,
    // Keyset paging: entries older than this entry's id (the "Older" link gives it).
    before: z
      .string()
      .trim()
      .optional()
      .transform((v) => (v ? v : undefined))
      .pipe(
        z
          .string()
          .regex(/^[1-9]\d{0,14}$/, "Older entries are asked for by an entry number, like before=1200: follow the page's Older link.")
          .transform(Number)
          .optional(),
      ),
  })
  .refine((f) => !f.from || !f.to || f.from <= f.to, { message: "The start date is after the end date.", path: ["to"] });

export type AuditFilter = z.infer<typeof auditFilterSchema>;
