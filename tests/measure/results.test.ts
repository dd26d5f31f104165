// The head measurement kinds and the generic in/out verdict.
import { describe, expect, it } from "vitest";
import {
  isPlausible,
  judgeRange,
  MEASUREMENT_KIND_IDS,
  MEASUREMENT_KINDS,
} from "@/lib/measure/results";

describe("judgeRange", () => {
  it("includes both ends and reports which side a reading falls out on", () => {
    // Seat contact width about 1.0–1.6 mm on an intake seat (service manuals).
    const intake = { min: 1.0, max: 1.6 };
    expect(judgeRange(1.0, intake)).toBe("within_spec");
    expect(judgeRange(1.6, intake)).toBe("within_spec");
    expect(judgeRange(0.9, intake)).toBe("below");
    expect(judgeRange(1.7, intake)).toBe("above");
  });

  it("works with one end only", () => {
    expect(judgeRange(0.06, { max: 0.05 })).toBe("above");
    expect(judgeRange(0.01, { max: 0.05 })).toBe("within_spec");
    expect(judgeRange(300, { min: 350 })).toBe("below");
    expect(judgeRange(300, { min: null, max: null })).toBe("within_spec");
  });

  it("refuses min above max and NaN", () => {
    expect(() => judgeRange(1, { min: 2, max: 1 })).toThrow(RangeError);
    expect(() => judgeRange(Number.NaN, { min: 0 })).toThrow(RangeError);
  });
});

describe("MEASUREMENT_KINDS", () => {
  it("describes every kind under its own id", () => {
    expect([...MEASUREMENT_KIND_IDS].sort()).toEqual(
      [
        "deck_flatness",
        "installed_spring_height",
        "journal_clearance",
        "seat_contact_width",
        "spring_load",
        "stem_guide_clearance",
        "valve_stem_diameter",
      ].sort(),
    );
    for (const id of MEASUREMENT_KIND_IDS) {
      const k = MEASUREMENT_KINDS[id];
      expect(k.id).toBe(id);
      expect(k.plausibleSi.min).toBeLessThan(k.plausibleSi.max);
      expect(k.defaultUnit).toBe(k.quantity === "force" ? "N" : "mm");
    }
    expect(MEASUREMENT_KINDS.deck_flatness.scope).toBe("head");
    expect(MEASUREMENT_KINDS.journal_clearance.scope).toBe("journal");
    expect(MEASUREMENT_KINDS.seat_contact_width.scope).toBe("seat");
  });

  it("keeps the typical seat widths (service manuals) inside its plausibility bounds", () => {
    // 1.0–1.6 mm intake, 1.2–2.2 mm exhaust: a real seat must never be refused as absurd.
    for (const mm of [1.0, 1.6, 1.2, 2.2]) expect(isPlausible("seat_contact_width", mm)).toBe(true);
    expect(MEASUREMENT_KINDS.seat_contact_width.help).toMatch(/1\.0–1\.6 mm.*1\.2–2\.2 mm/);
  });

  it("keeps typical journal clearances and service limits plausible, and refuses 5 mm", () => {
    // Standard ranges around 0.025–0.084 mm, service limits around 0.10–0.15 mm (service manuals).
    for (const mm of [0, 0.025, 0.084, 0.1, 0.15])
      expect(isPlausible("journal_clearance", mm)).toBe(true);
    expect(isPlausible("journal_clearance", 5)).toBe(false);
    expect(isPlausible("journal_clearance", -0.01)).toBe(false);
  });
});
