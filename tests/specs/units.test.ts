// Specification figures typed as the manual gives them, converted to SI with the factors of NIST
// SP 811 (Guide for the Use of the International System of Units, 2008 edition, Appendix B.8):
// 1 in = 2.54 cm exactly; 1 lbf·ft = 1.355 818 N·m; 1 lbf·in = 0.112 984 8 N·m; 1 lbf = 4.448 222 N.
import { describe, expect, it } from "vitest";
import { SI_UNIT, SPEC_UNITS, formatSi, toSi, unitFits } from "@/lib/specs/units";
import { specFigureSchema } from "@/lib/validations/specs";

describe("conversion to SI (NIST SP 811, Appendix B.8)", () => {
  it("an inch is 25.4 mm exactly", () => {
    expect(toSi("length", 1, "in")).toBe(25.4);
    // A stem-to-guide clearance of 0.0010–0.0023 in (a manual in inches) in mm.
    expect(toSi("length", 0.001, "in")).toBeCloseTo(0.0254, 12);
    expect(toSi("length", 0.0023, "in")).toBeCloseTo(0.05842, 12);
  });

  it("a pound-force foot is 1.355 818 N·m and a pound-force inch 0.112 984 8 N·m", () => {
    expect(toSi("torque", 1, "lbf·ft")).toBe(1.355818);
    expect(toSi("torque", 1, "lbf·in")).toBe(0.1129848);
    // 89 lbf·in (a small cap bolt) is 10.06 N·m; 7.4 lbf·ft is 10.03 N·m.
    expect(toSi("torque", 89, "lbf·in")).toBeCloseTo(10.0556, 4);
    expect(toSi("torque", 7.4, "lbf·ft")).toBeCloseTo(10.0331, 4);
    // Twelve lbf·in make one lbf·ft, to the digits NIST gives.
    expect(toSi("torque", 12, "lbf·in")).toBeCloseTo(toSi("torque", 1, "lbf·ft"), 5);
  });

  it("a pound-force is 4.448 222 N", () => {
    expect(toSi("force", 1, "lbf")).toBe(4.448222);
    expect(toSi("force", 45, "lbf")).toBeCloseTo(200.17, 2);
  });

  it("offers each quantity its own units, SI first, and nothing of another quantity", () => {
    expect(SPEC_UNITS.length[0]).toBe(SI_UNIT.length);
    expect(SPEC_UNITS.torque[0]).toBe(SI_UNIT.torque);
    expect(unitFits("length", "in")).toBe(true);
    expect(unitFits("torque", "lbf·ft")).toBe(true);
    expect(unitFits("torque", "lbf·in")).toBe(true);
    expect(unitFits("length", "lbf·ft")).toBe(false);
    expect(unitFits("torque", "in")).toBe(false);
    expect(formatSi("length", 0.0254)).toBe("0.0254 mm");
    expect(formatSi("torque", 10.0556)).toBe("10.1 N·m");
  });
});

describe("a figure as typed", () => {
  const parse = (o: Record<string, string>) =>
    specFigureSchema.safeParse({ key: "stem_guide_clearance_intake", ...o });
  const fieldErrors = (o: Record<string, string>) => {
    const r = parse(o);
    expect(r.success).toBe(false);
    return Object.fromEntries(r.error!.issues.map((i) => [String(i.path[0]), i.message]));
  };

  it("keeps the unit and the figures as typed beside the SI values", () => {
    const r = parse({ unit: "in", min: "0.0010", max: "0,0023", limit: "0.0031" });
    expect(r.success).toBe(true);
    expect(r.data).toMatchObject({
      unit: "in",
      entered: { min: "0.0010", max: "0.0023", limit: "0.0031" },
    });
    expect(r.data!.min).toBeCloseTo(0.0254, 12);
    expect(r.data!.max).toBeCloseTo(0.05842, 12);
    expect(r.data!.limit).toBeCloseTo(0.07874, 12);
  });

  it("takes SI when no unit is given, as the forms did before", () => {
    const r = parse({ min: "0.02", max: "0.05" });
    expect(r.data).toMatchObject({
      unit: "mm",
      min: 0.02,
      max: 0.05,
      entered: { min: "0.02", max: "0.05" },
    });
  });

  it("a torque in lbf·ft", () => {
    const r = specFigureSchema.safeParse({
      key: "cap_bolt_torque",
      unit: "lbf·ft",
      nominal: "7.4",
    });
    expect(r.data).toMatchObject({ unit: "lbf·ft", entered: { nominal: "7.4" } });
    expect(r.data!.nominal).toBeCloseTo(10.0331, 4);
  });

  it("refuses a unit of another quantity, an unknown unit, a negative figure and text, each on its field", () => {
    expect(fieldErrors({ unit: "lbf·ft", min: "0.001" }).unit).toMatch(
      /is a length: choose mm, in, µm/,
    );
    expect(fieldErrors({ unit: "cubit", min: "0.001" }).unit).toMatch(/choose mm/);
    expect(fieldErrors({ unit: "in", min: "-0.001" }).min).toBe("The minimum cannot be negative.");
    expect(fieldErrors({ unit: "in", max: "about 2 thou" }).max).toMatch(/as a number/);
    expect(fieldErrors({ unit: "in", max: "1e3" }).max).toMatch(/as a number/);
  });

  it("refuses absurd magnitudes after conversion, saying what the figure came to", () => {
    // 40 in is 1 016 mm: no clearance on a head; nor 9 000 lbf·ft (12 202 N·m) on a cap bolt.
    expect(fieldErrors({ unit: "in", min: "0.001", max: "40" }).max).toBe(
      "40 in is 1016 mm: far too large for this figure. Check the unit and the decimal point.",
    );
    const torque = specFigureSchema.safeParse({
      key: "cap_bolt_torque",
      unit: "lbf·ft",
      nominal: "9000",
    });
    expect(torque.error!.issues[0]).toMatchObject({
      path: ["nominal"],
      message: expect.stringMatching(/^9000 lbf·ft is 12202.4 N·m: far too large/),
    });
    // The same 4 typed in inches is too large (101.6 mm), in mm it is a fine installed height.
    expect(
      specFigureSchema.safeParse({ key: "installed_spring_height", unit: "in", min: "4" }).success,
    ).toBe(false);
    expect(
      specFigureSchema.safeParse({
        key: "installed_spring_height",
        unit: "mm",
        min: "34.5",
        max: "35.5",
      }).success,
    ).toBe(true);
  });

  it("compares the minimum, maximum and limit in SI", () => {
    expect(fieldErrors({ unit: "in", min: "0.0023", max: "0.0010" }).max).toBe(
      "The maximum is below the minimum.",
    );
    expect(fieldErrors({ unit: "in", min: "0.0010", max: "0.0023", limit: "0.002" }).limit).toMatch(
      /at or above the maximum/,
    );
  });
});
