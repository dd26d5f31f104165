// One schema for the job form and its server action.
import { z } from "zod";
import { customerContactFields } from "./customers";
import { DATE_RANGE_MESSAGE, isCalendarDate, isDateInRange, storableText } from "./text";

const optionalUuid = z
  .string({ error: "Choose from the list." })
  .trim()
  .transform((v) => (v === "" ? null : v))
  .nullable()
  .refine((v) => v === null || z.string().uuid().safeParse(v).success, "Choose from the list.");

const count = (label: string, min: number, max: number) =>
  z.coerce
    .number({ error: `Enter the ${label} as a number.` })
    .int(`The ${label} is a whole number.`)
    .min(min, `The ${label} is at least ${min}.`)
    .max(max, `The ${label} is at most ${max}.`);

export const jobFormSchema = z
  .object({
    customerId: optionalUuid,
    newCustomerName: storableText(z.string().trim().max(120, "Keep the name under 120 characters.")).default(""),
    // How to reach a new customer; all optional, and ignored when an existing customer is chosen.
    newCustomerContactName: customerContactFields.contactName,
    newCustomerEmail: customerContactFields.email,
    newCustomerPhone: customerContactFields.phone,
    newCustomerAddress: customerContactFields.address,
    engineDescription: storableText(
      z
        .string({ error: "Describe the engine." })
        .trim()
        .min(3, "Describe the engine (make, size, valves).")
        .max(200, "Keep the description under 200 characters."),
    ),
    engineSpecId: optionalUuid,
    // Nullable like the ids: the form sends its parsed values (no date is null) to the action, which parses them again.
    promisedOn: z
      .string({ error: "Use a date like 2026-12-24, or leave it blank." })
      .trim()
      .nullable()
      .default("")
      .refine((v) => v === null || v === "" || /^\d{4}-\d{2}-\d{2}$/.test(v), "Use a date like 2026-12-24.")
      .refine((v) => v === null || v === "" || !/^\d{4}-\d{2}-\d{2}$/.test(v) || isCalendarDate(v), "That day is not on the calendar.")
      .refine((v) => v === null || v === "" || !isCalendarDate(v) || isDateInRange(v), DATE_RANGE_MESSAGE)
      .transform((v) => (v === "" ? null : v)),
    assignedTechnicianId: optionalUuid,
    notes: storableText(z.string().trim().max(2000, "Keep notes under 2000 characters.")).default(""),
    headLabel: storableText(z.string().trim().min(1, "Name the head (e.g. Cylinder head).").max(60)).default("Cylinder head"),
    arrangement: z.enum(["inline", "v"], { error: "Choose inline or V." }),
    cylinderCount: count("cylinder count", 1, 16),
    intakeValvesPerCylinder: count("intake valves per cylinder", 1, 3),
    exhaustValvesPerCylinder: count("exhaust valves per cylinder", 1, 3),
    camshaftCount: count("camshaft count", 0, 4),
    journalsPerCamshaft: count("journals per camshaft", 0, 12),
  })
  .refine((j) => j.customerId !== null || j.newCustomerName.length >= 2, {
    message: "Choose a customer or type a new one.",
    path: ["customerId"],
  })
  .refine((j) => j.arrangement === "inline" || j.cylinderCount % 2 === 0, {
    message: "A V head needs an even number of cylinders.",
    path: ["cylinderCount"],
  })
  .refine((j) => (j.camshaftCount === 0) === (j.journalsPerCamshaft === 0), {
    message: "Give journals for each camshaft, or no camshafts at all (pushrod head).",
    path: ["journalsPerCamshaft"],
  });

export type JobFormInput = z.input<typeof jobFormSchema>;
export type JobFormValues = z.output<typeof jobFormSchema>;

export const jobStatusChangeSchema = z.object({
  jobId: z.string().uuid(),
  to: z.enum(["queued", "at_bench", "awaiting_audit", "signed_off", "collected"]),
  /** A hand-in with unfinished work goes through only with this set ("yes", as a checkbox sends it). */
  confirmUnfinished: z.preprocess(
    (v) => (v === null || v === undefined || v === "" ? false : v),
    z.union([z.literal(false), z.literal("yes").transform(() => true)], {
      error: "Tick the box to hand the head in with unfinished work.",
    }),
  ),
});

export const takeBackSchema = z.object({ jobId: z.string().uuid("Unknown job.") });
