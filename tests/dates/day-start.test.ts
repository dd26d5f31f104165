// Where a calendar day begins in the shop's time zone (lib/dates.ts startOfDayIn), as the audit
// trail's day filters read it. Offsets from the IANA time zone database (tzdata), which the
// runtime's Intl carries: Europe/London is UTC+0 in winter and UTC+1 from 01:00 UTC on the last
// Sunday of March to 01:00 UTC on the last Sunday of October; America/Santiago moves from UTC-4 to
// UTC-3 at local midnight on the first Sunday of September (2026-09-06), so that midnight never
// happens there; Pacific/Auckland is UTC+12 in June (NZST).
import { describe, expect, it } from "vitest";
import { nextDay, startOfDayIn } from "@/lib/dates";

const iso = (day: string, tz: string) => startOfDayIn(day, tz).toISOString();

describe("startOfDayIn", () => {
  it("is midnight there, as an instant", () => {
    expect(iso("2026-12-05", "Europe/London")).toBe("2026-12-05T00:00:00.000Z");
    expect(iso("2026-06-01", "Europe/London")).toBe("2026-05-31T23:00:00.000Z");
    expect(iso("2026-06-01", "Pacific/Auckland")).toBe("2026-05-31T12:00:00.000Z");
    expect(iso("2026-06-01", "America/New_York")).toBe("2026-06-01T04:00:00.000Z");
    expect(iso("2026-06-01", "UTC")).toBe("2026-06-01T00:00:00.000Z");
  });

  it("holds on the days the clocks change", () => {
    // Both London changes happen at 01:00 UTC, after midnight: the day starts at the old offset.
    expect(iso("2026-03-29", "Europe/London")).toBe("2026-03-29T00:00:00.000Z");
    expect(iso("2026-10-25", "Europe/London")).toBe("2026-10-24T23:00:00.000Z");
    // A skipped midnight: the day starts at its first moment, 01:00 local (UTC-3).
    expect(iso("2026-09-06", "America/Santiago")).toBe("2026-09-06T04:00:00.000Z");
    expect(iso("2026-09-05", "America/Santiago")).toBe("2026-09-05T04:00:00.000Z");
  });

  it("takes an unknown zone as UTC, and the years the filters allow", () => {
    expect(iso("2026-06-01", "Mars/Olympus_Mons")).toBe("2026-06-01T00:00:00.000Z");
    // London has kept GMT in winter since 1847 (tzdata), so 1900 starts at midnight UTC.
    expect(iso("1900-01-01", "Europe/London")).toBe("1900-01-01T00:00:00.000Z");
    expect(iso(nextDay("9998-12-31"), "UTC")).toBe("9999-01-01T00:00:00.000Z");
    expect(() => startOfDayIn("14/03/2026", "UTC")).toThrow(RangeError);
  });

  it("nextDay crosses months, years and leap days", () => {
    expect(nextDay("2026-01-31")).toBe("2026-02-01");
    expect(nextDay("2024-02-28")).toBe("2024-02-29");
    expect(nextDay("2026-12-31")).toBe("2027-01-01");
  });
});
