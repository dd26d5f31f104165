// One date format in the shop's time zone (lib/dates.ts). Offsets from the IANA time zone
// database: Europe/London is UTC+0 (GMT) in winter and UTC+1 (BST) from the last Sunday of March.
import { describe, expect, it } from "vitest";
import { formatDay, formatWhen, usableTimeZone } from "@/lib/dates";

describe("formatWhen", () => {
  it("writes a moment in the shop's zone, with the zone's name", () => {
    expect(formatWhen("2026-12-05T17:24:09Z", "Europe/London")).toBe("5 Dec 2026, 17:24 GMT");
    expect(formatWhen("2026-07-05T17:24:09Z", "Europe/London")).toBe("5 Jul 2026, 18:24 BST");
    expect(formatWhen(new Date("2026-12-05T23:30:00Z"), "UTC")).toBe("5 Dec 2026, 23:30 UTC");
    expect(formatWhen("2026-12-05T17:24:09Z", "Europe/London", { seconds: true })).toBe("5 Dec 2026, 17:24:09 GMT");
  });

  it("never throws on a bad moment or an unknown zone", () => {
    expect(formatWhen("not a date", "Europe/London")).toBe("—");
    expect(usableTimeZone("Mars/Olympus_Mons")).toBe("UTC");
    expect(usableTimeZone(null)).toBe("Europe/London");
    expect(formatWhen("2026-12-05T17:24:09Z", "Mars/Olympus_Mons")).toBe("5 Dec 2026, 17:24 UTC");
  });
});

describe("formatDay", () => {
  it("writes a stored calendar day as it is, in the same style", () => {
    expect(formatDay("2026-12-05")).toBe("5 Dec 2026");
    expect(formatDay("2026-01-31")).toBe("31 Jan 2026");
    expect(formatDay(null)).toBe("—");
    expect(formatDay("soon")).toBe("—");
  });
});
