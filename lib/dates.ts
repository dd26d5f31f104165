// The one way Grindfade writes a moment and a calendar day, in the shop's own time zone (shops.time_zone,
// an IANA name): "5 Dec 2026, 17:24 GMT". Pure, for the server and the browser alike.
export const DEFAULT_TIME_ZONE = "Europe/London";

const formats = new Map<string, Intl.DateTimeFormat>();

/** The zone itself when the runtime knows it, else UTC (an unknown name would make Intl throw). */
export function usableTimeZone(timeZone: string | null | undefined): string {
  const tz = timeZone || DEFAULT_TIME_ZONE;
  try {
    new Intl.DateTimeFormat("en-GB", { timeZone: tz });
    return tz;
  } catch {
    return "UTC";
  }
}

function formatter(timeZone: string, seconds: boolean): Intl.DateTimeFormat {
  const key = `${timeZone}|${seconds}`;
  let f = formats.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat("en-GB", {
      timeZone: usableTimeZone(timeZone),
      day: "numeric",
      month: "short",
      year: "numeric",
      hour: "2-digit",
      minute: "2-digit",
      ...(seconds ? { second: "2-digit" } : {}),
      hourCycle: "h23",
      timeZoneName: "short",
    });
    formats.set(key, f);
  }
  return f;
}

/** A moment in the shop's time zone, like "5 Dec 2026, 17:24 GMT" (with seconds for the audit trail). */
export function formatWhen(at: Date | string | number, timeZone: string, options: { seconds?: boolean } = {}): string {
  const d = at instanceof Date ? at : new Date(at);
  if (Number.isNaN(d.getTime())) return "—";
  return formatter(timeZone, Boolean(options.seconds)).format(d);
}

const DAY = new Intl.DateTimeFormat("en-GB", { timeZone: "UTC", day: "numeric", month: "short", year: "numeric" });

/**
 * A calendar day stored without a time ("2026-12-05", e.g. a promised date), like "5 Dec 2026".
 * It is the same day in every zone, so it is written as stored, never shifted.
 */
export function formatDay(isoDate: string | null | undefined): string {
  if (!isoDate) return "—";
  const m = /^(\d{4})-(\d{2})-(\d{2})/.exec(isoDate);
  if (!m) return "—";
  return DAY.format(new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]))));
}

const offsetFormats = new Map<string, Intl.DateTimeFormat>();

/** How far the zone's wall clock is ahead of UTC at a moment, in milliseconds. */
function zoneOffsetMs(t: number, timeZone: string): number {
  let f = offsetFormats.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", {
      timeZone,
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
      hourCycle: "h23",
    });
    offsetFormats.set(timeZone, f);
  }
  const p = Object.fromEntries(f.formatToParts(new Date(t)).map((x) => [x.type, x.value]));
  const wall = Date.UTC(Number(p.year), Number(p.month) - 1, Number(p.day), Number(p.hour), Number(p.minute), Number(p.second));
  return wall - Math.floor(t / 1000) * 1000;
}

/**
 * The moment a calendar day ("2026-06-01") begins in a time zone: midnight there, as an instant.
 * Where a clock change skips midnight, the first moment of the day that exists.
 */
export function startOfDayIn(day: string, timeZone: string): Date {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(day);
  if (!m) throw new RangeError(`Not a calendar day: ${day}`);
  const tz = usableTimeZone(timeZone);
  const midnightUtc = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
  // Twice: the offset at the first guess may differ from the offset at the answer across a change.
  let t = midnightUtc - zoneOffsetMs(midnightUtc, tz);
  t = midnightUtc - zoneOffsetMs(t, tz);
  // A skipped midnight (clocks go forward at 00:00) lands on the previous day: step to the change.
  if (t + zoneOffsetMs(t, tz) < midnightUtc) t = midnightUtc - zoneOffsetMs(t, tz);
  return new Date(t);
}

/** The calendar day after a YYYY-MM-DD day. */
export function nextDay(day: string): string {
  const d = new Date(`${day}T00:00:00.000Z`);
  d.setUTCDate(d.getUTCDate() + 1);
  return d.toISOString().slice(0, 10);
}
