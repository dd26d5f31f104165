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
