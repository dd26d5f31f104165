// The shop's own details, printed at the head of every report.
import { z } from "zod";
import { storableText } from "./text";

/** True when the runtime knows the zone by its IANA name (Intl, as lib/dates.ts shows dates). */
export function isIanaTimeZone(zone: string): boolean {
  if (!/^[A-Za-z_]+(\/[A-Za-z0-9_+\-]+)*$/.test(zone)) return false;
  try {
    new Intl.DateTimeFormat("en-GB", { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

const optional = (schema: z.ZodType<string>) =>
  z.preprocess((v) => (v === undefined || v === null ? "" : v), schema).transform((v) => (v === "" ? null : v));

export const shopSettingsSchema = z.object({
  name: storableText(
    z.string({ error: "Enter the shop's name." }).trim().min(2, "Enter the shop's name (at least 2 characters).").max(120, "Keep the name under 120 characters."),
  ),
  address: optional(storableText(z.string({ error: "Enter the address, or leave it blank." }).trim().max(300, "Keep the address under 300 characters."))),
  phone: optional(
    z
      .string({ error: "Enter a phone number, or leave it blank." })
      .trim()
      .max(30, "Keep the phone number under 30 characters.")
      .refine((v) => v === "" || /^\+?[0-9 ()\-./]+$/.test(v), "Use digits, spaces and + ( ) - . only, e.g. 01632 960 414.")
      .refine((v) => v === "" || (v.match(/[0-9]/g) ?? []).length >= 6, "A phone number has at least 6 digits."),
  ),
  timeZone: z
    .string({ error: "Choose the shop's time zone." })
    .trim()
    .min(1, "Choose the shop's time zone, e.g. Europe/London.")
    .max(64, "That is not a time zone name.")
    .refine(isIanaTimeZone, "Use a time zone name like Europe/London or America/Chicago.")
    // Stored as the runtime spells it ("europe/london" becomes "Europe/London").
    .transform((zone) => new Intl.DateTimeFormat("en-GB", { timeZone: zone }).resolvedOptions().timeZone),
});

export type ShopSettings = z.output<typeof shopSettingsSchema>;
