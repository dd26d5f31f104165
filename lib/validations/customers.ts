// The customer's record: who they are and how to reach them. One set of field rules for the
// customers screen and for a customer created while booking in a job.
import { z } from "zod";
import { storableText } from "./text";

/** Optional text: blank (or absent) is "not given" and stored as null. */
const optionalText = (max: number, tooLong: string) =>
  z.preprocess(
    (v) => (v === undefined || v === null ? "" : v),
    storableText(z.string({ error: "Enter text here, or leave it blank." }).trim().max(max, tooLong)).transform((v) => (v === "" ? null : v)),
  );

/** Digits, spaces and the marks people write phone numbers with: + ( ) - . / and "ext". */
const PHONE_CHARACTERS = /^\+?[0-9 ()\-./]+(\s*(ext\.?|x)\s*[0-9]{1,6})?$/i;

export const customerNameSchema = storableText(
  z
    .string({ error: "Enter the customer's name." })
    .trim()
    .min(2, "Enter the customer's name (at least 2 characters).")
    .max(120, "Keep the name under 120 characters."),
);

export const customerContactFields = {
  contactName: optionalText(120, "Keep the contact person's name under 120 characters."),
  email: z.preprocess(
    (v) => (v === undefined || v === null ? "" : v),
    z
      .string({ error: "Enter an e-mail address, or leave it blank." })
      .trim()
      .toLowerCase()
      .max(200, "That e-mail address is too long.")
      .refine((v) => v === "" || z.string().email().safeParse(v).success, "That does not look like an e-mail address (name@example.com).")
      .transform((v) => (v === "" ? null : v)),
  ),
  phone: z.preprocess(
    (v) => (v === undefined || v === null ? "" : v),
    z
      .string({ error: "Enter a phone number, or leave it blank." })
      .trim()
      .max(30, "Keep the phone number under 30 characters.")
      .refine((v) => v === "" || PHONE_CHARACTERS.test(v), "Use digits, spaces and + ( ) - . only, e.g. 01632 960 123.")
      .refine((v) => v === "" || !PHONE_CHARACTERS.test(v) || (v.match(/[0-9]/g) ?? []).length >= 6, "A phone number has at least 6 digits.")
      .transform((v) => (v === "" ? null : v)),
  ),
  address: optionalText(300, "Keep the address under 300 characters."),
};

export const customerSchema = z.object({ name: customerNameSchema, ...customerContactFields });
export const customerUpdateSchema = customerSchema.extend({ id: z.string().uuid("Unknown customer.") });

export type CustomerValues = z.output<typeof customerSchema>;

/** A form's fields as the schema reads them. */
export const customerFormFields = (f: FormData) => ({
  name: f.get("name"),
  contactName: f.get("contactName"),
  email: f.get("email"),
  phone: f.get("phone"),
  address: f.get("address"),
});
