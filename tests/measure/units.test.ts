// Unit conversions against NIST SP 811 Appendix B, round trips, and the torque sheet's rounding.
import { describe, expect, it } from "vitest";
import {
  convertTorqueList,
  convertTorqueText,
  formatTorque,
  fromMm,
  fromN,
  fromNm,
  lengthUnitSchema,
  roundTo,
  toMm,
  toN,
  toNm,
  torqueUnitSchema,
  LENGTH_UNITS,
  TORQUE_UNITS,
  FORCE_UNITS,
} from "@/lib/measure/units";

describe("length", () => {
  it("uses 1 in = 25.4 mm exactly (NIST SP 811 Appendix B)", () => {
    expect(toMm(1, "in")).toBe(25.4);
    expect(fromMm(25.4, "in")).toBe(1);
    // 0.003 in = 0.0762 mm: the upper end of a 0.001–0.003 in strip (arithmetic from the exact factor).
    expect(toMm(0.003, "in")).toBeCloseTo(0.0762, 12);
  });

  it("treats µm as a thousandth of a mm (SI prefix)", () => {
    expect(toMm(51, "um")).toBeCloseTo(0.051, 12);
    expect(fromMm(0.051, "um")).toBeCloseTo(51, 9);
  });
});

describe("torque", () => {
  it("matches the NIST SP 811 Appendix B factors", () => {
    expect(toNm(1, "lbf·ft")).toBe(1.355818); // NIST SP 811: 1 lbf·ft = 1.355 818 N·m
    expect(toNm(1, "lbf·in")).toBe(0.1129848); // NIST SP 811: 1 lbf·in = 0.112 984 8 N·m
    expect(toNm(1, "kgf·m")).toBe(9.80665); // NIST SP 811: 1 kgf·m = 9.806 65 N·m (exact)
  });

  it("gives 10 N·m = 7.3756 lbf·ft and 1.0197 kgf·m (10 / the NIST SP 811 factors)", () => {
    // 10 / 1.355818 = 7.37563…, 10 / 9.80665 = 1.01972…: derived from the NIST factors by hand.
    expect(fromNm(10, "lbf·ft")).toBeCloseTo(7.3756, 4);
    expect(fromNm(10, "kgf·m")).toBeCloseTo(1.0197, 4);
    // 1 lbf·ft = 12 lbf·in by definition of the foot; the NIST factors agree to their 7 digits.
    expect(fromNm(toNm(1, "lbf·ft"), "lbf·in")).toBeCloseTo(12, 4);
  });

  it("prints a torque sheet line in N·m to 0.1, lbf·ft to 0.1 and kgf·m to 0.01", () => {
    // 10 N·m → 7.4 lbf·ft, 1.02 kgf·m, 89 lbf·in (10 / 0.1129848 = 88.5…) from the NIST factors.
    expect(formatTorque(10)).toEqual({ nm: 10, lbfFt: 7.4, lbfIn: 89, kgfM: 1.02 });
    // 6 N·m stage (60 % of 10): 6 / 1.355818 = 4.425…, 6 / 9.80665 = 0.6118…
    expect(formatTorque(6)).toEqual({ nm: 6, lbfFt: 4.4, lbfIn: 53, kgfM: 0.61 });
  });
});

describe("force", () => {
  it("matches the NIST SP 811 Appendix B factors", () => {
    expect(toN(1, "lbf")).toBe(4.448222); // NIST SP 811: 1 lbf = 4.448 222 N
    expect(toN(1, "kgf")).toBe(9.80665); // NIST SP 811: 1 kgf = 9.806 65 N (exact)
  });
});

describe("round trips", () => {
  const values = [0, 0.001, 0.051, 1, 10, 26.0, 1234.5678];
  it.each(LENGTH_UNITS.map((u) => [u]))("length through %s and back", (u) => {
    for (const v of values) expect(toMm(fromMm(v, u), u)).toBeCloseTo(v, 9);
  });
  it.each(TORQUE_UNITS.map((u) => [u]))("torque through %s and back", (u) => {
    for (const v of values) expect(toNm(fromNm(v, u), u)).toBeCloseTo(v, 9);
  });
  it.each(FORCE_UNITS.map((u) => [u]))("force through %s and back", (u) => {
    for (const v of values) expect(toN(fromN(v, u), u)).toBeCloseTo(v, 9);
  });
});

describe("guards", () => {
  it("refuses NaN and infinities instead of passing them on", () => {
    expect(() => toMm(Number.NaN, "mm")).toThrow(RangeError);
    expect(() => toNm(Number.POSITIVE_INFINITY, "lbf·ft")).toThrow(RangeError);
  });

  it("refuses units it does not know", () => {
    expect(lengthUnitSchema.safeParse("ft").success).toBe(false);
    expect(torqueUnitSchema.safeParse("Nm").success).toBe(false);
    expect(torqueUnitSchema.safeParse("N·m").success).toBe(true);
  });

  it("rounds halves away from zero", () => {
    expect(roundTo(1.005, 2)).toBe(1.01);
    expect(roundTo(-0.05, 1)).toBe(-0.1);
    expect(roundTo(0.0762, 3)).toBe(0.076);
  });
});

describe("changing the unit of a typed torque", () => {
  it("converts the figure, keeping the torque (NIST SP 811 Appendix B.8)", () => {
    // 10 N·m = 88.51 lbf·in (÷ 0.1129848) = 7.376 lbf·ft (÷ 1.355818) = 1.020 kgf·m (÷ 9.80665).
    expect(convertTorqueText("10", "N·m", "lbf·in")).toBe("88.51");
    expect(convertTorqueText("10", "N·m", "lbf·ft")).toBe("7.376");
    expect(convertTorqueText("10", "N·m", "kgf·m")).toBe("1.02");
    expect(convertTorqueText("7,4", "lbf·ft", "N·m")).toBe("10.03");
  });

  it("comes back to the figure typed after a round trip through every unit", () => {
    let t = "10";
    for (const [from, to] of [["N·m", "lbf·in"], ["lbf·in", "kgf·m"], ["kgf·m", "lbf·ft"], ["lbf·ft", "N·m"]] as const)
      t = convertTorqueText(t, from, to);
    expect(Number(t)).toBeCloseTo(10, 2);
  });

  it("leaves text that is not a torque as typed, for the form's check to refuse", () => {
    expect(convertTorqueText("", "N·m", "lbf·in")).toBe("");
    expect(convertTorqueText("ten", "N·m", "lbf·in")).toBe("ten");
    expect(convertTorqueText("10", "N·m", "N·m")).toBe("10");
  });

  it("converts a list of stage torques figure by figure", () => {
    expect(convertTorqueList("4, 7", "N·m", "lbf·ft")).toBe("2.95, 5.163");
    expect(convertTorqueList("", "N·m", "lbf·ft")).toBe("");
  });
});
