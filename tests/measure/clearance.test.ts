// Journal oil clearance: strip ranges, readings outside them, subtraction of diameters, verdicts.
import { describe, expect, it } from "vitest";
import {
  clearanceFromDiameters,
  GAUGE_RULES,
  GAUGE_STRIPS,
  gaugeStrip,
  judgeClearance,
  stripCheck,
} from "@/lib/measure/clearance";
import { toMm } from "@/lib/measure/units";

describe("gauge strips", () => {
  it("offers the two common ranges, 0.025–0.076 mm and 0.051–0.152 mm (common practice)", () => {
    expect(GAUGE_STRIPS.map((s) => [s.id, s.minMm, s.maxMm])).toEqual([
      ["narrow", 0.025, 0.076],
      ["wide", 0.051, 0.152],
    ]);
    // The same strips in inches, 0.001–0.003 and 0.002–0.006 in (common practice).
    expect(GAUGE_STRIPS.map((s) => [s.minIn, s.maxIn])).toEqual([
      [0.001, 0.003],
      [0.002, 0.006],
    ]);
    for (const s of GAUGE_STRIPS) {
      // Each mm end is the inch end converted at 25.4 mm/in (NIST SP 811), rounded to the micrometre.
      expect(toMm(s.minIn, "in")).toBeCloseTo(s.minMm, 3);
      expect(toMm(s.maxIn, "in")).toBeCloseTo(s.maxMm, 3);
      expect(s.label).toContain(`${s.minMm.toFixed(3)}–${s.maxMm.toFixed(3)} mm`);
    }
  });

  it("accepts readings across a strip's range, ends included", () => {
    for (const mm of [0.025, 0.051, 0.076]) expect(stripCheck(mm, "narrow")).toEqual({ ok: true });
    for (const mm of [0.051, 0.1, 0.152]) expect(stripCheck(mm, "wide")).toEqual({ ok: true });
  });

  it("accepts the strip's inch-scale ends, which sit a fraction of a micrometre past the mm ends", () => {
    // 0.003 in = 0.0762 mm and 0.006 in = 0.1524 mm (25.4 mm/in, NIST SP 811).
    expect(stripCheck(toMm(0.003, "in"), "narrow").ok).toBe(true);
    expect(stripCheck(toMm(0.002, "in"), "wide").ok).toBe(true);
    expect(stripCheck(toMm(0.006, "in"), "wide").ok).toBe(true);
  });

  it("flags a reading beyond the wide strip and suggests measuring otherwise", () => {
    const r = stripCheck(0.16, "wide");
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.reason).toBe("above-range");
    expect(r.suggestedStripId).toBeNull();
    expect(r.message).toBe(
      "0.160 mm is beyond the wide strip's range (0.051–0.152 mm): use a wider-range strip or measure by bore and journal diameters.",
    );
  });

  it("points a narrow-strip reading above its range to the wide strip", () => {
    const r = stripCheck(0.09, "narrow");
    expect(r).toMatchObject({ ok: false, reason: "above-range", suggestedStripId: "wide" });
    if (!r.ok)
      expect(r.message).toContain("use the next wider strip (the wide strip, 0.051–0.152 mm)");
  });

  it("points a wide-strip reading below its range to the narrow strip", () => {
    const r = stripCheck(0.03, "wide");
    expect(r).toMatchObject({ ok: false, reason: "below-range", suggestedStripId: "narrow" });
    if (!r.ok)
      expect(r.message).toBe(
        "0.030 mm is below the wide strip's range (0.051–0.152 mm): use the next narrower strip (the narrow strip, 0.025–0.076 mm).",
      );
  });

  it("flags a reading below the narrow strip without pointing to a strip that cannot read it", () => {
    const r = stripCheck(0.02, "narrow");
    expect(r).toMatchObject({ ok: false, reason: "below-range", suggestedStripId: null });
    if (!r.ok) expect(r.message).toContain("measure by bore and journal diameters");
  });

  it("does not suggest a strip that would also be out of range", () => {
    expect(stripCheck(0.2, "narrow")).toMatchObject({
      ok: false,
      reason: "above-range",
      suggestedStripId: null,
    });
  });

  it("refuses unknown strips and NaN", () => {
    expect(() => gaugeStrip("green" as never)).toThrow(RangeError);
    expect(() => stripCheck(Number.NaN, "wide")).toThrow(RangeError);
  });

  it("states the usage rules (manufacturers' service manuals)", () => {
    const text = GAUGE_RULES.join(" ").toLowerCase();
    for (const word of ["dry", "oil hole", "torque", "never turn", "widest", "every trace"])
      expect(text).toContain(word);
  });
});

describe("clearance from diameters", () => {
  it("subtracts the journal from the bore: 26.000 − 25.949 = 0.051 mm", () => {
    // A made-up worked example in the service-manual style (bore gauge on the cap bore, micrometer
    // on the journal); the answer is plain subtraction.
    expect(clearanceFromDiameters(26.0, 25.949)).toBe(0.051);
    // The same in inches: 1.0240 − 1.0220 in = 0.0020 in = 0.0508 mm (25.4 mm/in, NIST SP 811).
    expect(clearanceFromDiameters(toMm(1.024, "in"), toMm(1.022, "in"))).toBeCloseTo(0.0508, 6);
  });

  it("gives zero for equal diameters and refuses a journal larger than its bore", () => {
    expect(clearanceFromDiameters(26, 26)).toBe(0);
    expect(() => clearanceFromDiameters(26.0, 26.01)).toThrow(
      /journal \(26\.010 mm\) is larger than its bore \(26\.000 mm\)/,
    );
  });

  it("refuses non-positive or non-numeric diameters", () => {
    expect(() => clearanceFromDiameters(0, 0)).toThrow(RangeError);
    expect(() => clearanceFromDiameters(26, Number.NaN)).toThrow(RangeError);
  });
});

describe("judgeClearance", () => {
  // 0.04–0.08 mm with a 0.051 mm reading counting as good: common practice.
  const spec = { minMm: 0.04, maxMm: 0.08, serviceLimitMm: 0.12 };

  it("counts 0.051 mm within 0.04–0.08 mm as within spec (common practice)", () => {
    expect(judgeClearance(0.051, spec)).toBe("within_spec");
  });

  it("includes both ends of the specification", () => {
    expect(judgeClearance(0.04, spec)).toBe("within_spec");
    expect(judgeClearance(0.08, spec)).toBe("within_spec");
  });

  it("calls below min tight, above max loose, and at or past the service limit beyond limit", () => {
    expect(judgeClearance(0.039, spec)).toBe("tight");
    expect(judgeClearance(0.081, spec)).toBe("loose");
    expect(judgeClearance(0.119, spec)).toBe("loose");
    expect(judgeClearance(0.12, spec)).toBe("beyond_limit");
    expect(judgeClearance(0.2, spec)).toBe("beyond_limit");
  });

  it("without a service limit, anything above max is loose", () => {
    expect(judgeClearance(0.3, { minMm: 0.04, maxMm: 0.08 })).toBe("loose");
    expect(judgeClearance(0.3, { minMm: 0.04, maxMm: 0.08, serviceLimitMm: null })).toBe("loose");
  });

  it("compares a spec and a reading both typed in inches as equal at the boundary", () => {
    const inchSpec = {
      minMm: toMm(0.0015, "in"),
      maxMm: toMm(0.003, "in"),
      serviceLimitMm: toMm(0.0045, "in"),
    };
    expect(judgeClearance(toMm(0.003, "in"), inchSpec)).toBe("within_spec");
    expect(judgeClearance(toMm(0.0045, "in"), inchSpec)).toBe("beyond_limit");
  });

  it("refuses a specification that contradicts itself", () => {
    expect(() => judgeClearance(0.05, { minMm: 0.08, maxMm: 0.04 })).toThrow(/minimum/);
    expect(() => judgeClearance(0.05, { minMm: 0.04, maxMm: 0.08, serviceLimitMm: 0.06 })).toThrow(
      /service limit/,
    );
  });
});
