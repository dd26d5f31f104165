// Checks shared by every schema that takes free text or a typed date.
import type { z } from "zod";

/**
 * Text with no C0 control characters other than tab, line feed and carriage return, and no DEL.
 * Nobody types them; PostgreSQL cannot store NUL in text at all, and the others would end up in
 * CSV exports and e-mails.
 */
const NO_CONTROL_CHARACTERS = /^[^\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]*$/;

export const CONTROL_CHARACTERS_MESSAGE = "Remove the control characters (such as NUL) from the text.";

/** The schema, refusing control characters with a message that says so. */
export const storableText = (schema: z.ZodString): z.ZodString => schema.regex(NO_CONTROL_CHARACTERS, CONTROL_CHARACTERS_MESSAGE);

/**
 * The years a typed date may fall in. A shop's records start well after 1900; 9998 keeps the day
 * after any accepted date (a filter's "to" runs to the end of its day) a four-digit year, which is
 * all a timestamp's text form carries (the year 10000 is written +010000, which PostgreSQL refuses).
 */
export const FIRST_YEAR = 1900;
export const LAST_YEAR = 9998;

export const DATE_RANGE_MESSAGE = `Use a date between ${FIRST_YEAR} and ${LAST_YEAR}.`;

/** True for a YYYY-MM-DD date that exists on the calendar (not 2026-02-31 or 2026-13-45). */
export function isCalendarDate(value: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(value);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  // setUTCFullYear, not Date.UTC: Date.UTC reads years 0 to 99 as 1900 to 1999.
  const date = new Date(0);
  date.setUTCFullYear(y, mo - 1, d);
  return date.getUTCFullYear() === y && date.getUTCMonth() === mo - 1 && date.getUTCDate() === d;
}

/** True for a YYYY-MM-DD date whose year is between FIRST_YEAR and LAST_YEAR. */
export function isDateInRange(value: string): boolean {
  const year = Number(value.slice(0, 4));
  return year >= FIRST_YEAR && year <= LAST_YEAR;
}
