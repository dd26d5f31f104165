// The measurement schemas: what forms and actions accept, and the field each refusal lands on.
import { describe, expect, it } from "vitest";
import { judgeClearance } from "@/lib/measure/clearance";
import {
  clearanceMmOf,
  clearanceSpecMm,
  clearanceSpecSchema,
  journalClearanceReadingSchema,
  measurementSchema,
  measurementSi,
  tickSchema,
  torqueSheetSetupSchema,
} from "@/lib/validations/measurements";

const id = "0b6f1c52-8f0e-4d7a-9a55-3c1d2e4f5a6b";
type Safe = {
  success: boolean;
  error?: { issues: Array<{ path: PropertyKey[]; message: string }> };
};
const errors = (r: Safe) =>
  r.success ? {} : Object.fromEntries(r.error!.issues.map((i) => [i.path.join("."), i.message]));

const strip = (over: Record<string, unknown> = {}) => ({
  journalId: id,
  method: "strip",
  stripId: "narrow",
  value: "0.051",
  unit: "mm",
  ...over,
});

describe("journalClearanceReadingSchema", () => {
  it("parses a strip reading typed as text, with a point or a comma", () => {
    const r = journalClearanceReadingSchema.parse(strip());
    expect(r).toEqual({
      journalId: id,
      method: "strip",
      stripId: "narrow",
      value: 0.051,
      unit: "mm",
    });
    expect(journalClearanceReadingSchema.parse(strip({ value: "0,051" }))).toMatchObject({
      value: 0.051,
    });
    // 0.002 in = 0.0508 mm (25.4 mm/in, NIST SP 811).
    expect(
      clearanceMmOf(journalClearanceReadingSchema.parse(strip({ value: "0.002", unit: "in" }))),
    ).toBeCloseTo(0.0508, 9);
  });

  it("parses diameters and gives bore minus journal", () => {
    // Made-up worked example in the service-manual style: 26.000 − 25.949 mm = 0.051 mm.
    const r = journalClearanceReadingSchema.parse({
      journalId: id,
      method: "diameters",
      boreValue: "26.000",
      journalValue: "25.949",
      unit: "mm",
    });
    expect(clearanceMmOf(r)).toBe(0.051);
    // 0.051 mm in a 0.04–0.08 mm spec is within spec (common practice).
    expect(judgeClearance(clearanceMmOf(r), { minMm: 0.04, maxMm: 0.08 })).toBe("within_spec");
  });

  it("answers negative, non-numeric and blank values on the value field", () => {
    expect(errors(journalClearanceReadingSchema.safeParse(strip({ value: "-0.05" })))).toEqual({
      value: "A measurement cannot be negative.",
    });
    expect(errors(journalClearanceReadingSchema.safeParse(strip({ value: "abc" })))).toEqual({
      value: "Enter the strip reading as a number, like 0.051.",
    });
    expect(errors(journalClearanceReadingSchema.safeParse(strip({ value: "" })))).toEqual({
      value: "Enter the strip reading.",
    });
    for (const value of ["1e-2", "0x10", "0.05 mm", "Infinity", "1,000.5"])
      expect(
        Object.keys(errors(journalClearanceReadingSchema.safeParse(strip({ value })))),
      ).toEqual(["value"]);
  });

  it("refuses a 5 mm cam clearance as absurd, also when it arrives in inches", () => {
    const mm = errors(journalClearanceReadingSchema.safeParse(strip({ value: "5" })));
    expect(mm.value).toMatch(
      /^5 mm is not a plausible camshaft journal oil clearance \(0–0\.5 mm\)/,
    );
    // 0.2 in = 5.08 mm (25.4 mm/in).
    expect(
      Object.keys(
        errors(journalClearanceReadingSchema.safeParse(strip({ value: "0.2", unit: "in" }))),
      ),
    ).toEqual(["value"]);
    // 51 µm is the same 0.051 mm and is fine.
    expect(
      journalClearanceReadingSchema.safeParse(strip({ value: "51", unit: "um" })).success,
    ).toBe(true);
  });

  it("refuses unknown units, strips, journals and methods on their own fields", () => {
    expect(
      Object.keys(errors(journalClearanceReadingSchema.safeParse(strip({ unit: "ft" })))),
    ).toEqual(["unit"]);
    expect(
      Object.keys(errors(journalClearanceReadingSchema.safeParse(strip({ stripId: "green" })))),
    ).toEqual(["stripId"]);
    expect(
      Object.keys(errors(journalClearanceReadingSchema.safeParse(strip({ journalId: "7" })))),
    ).toEqual(["journalId"]);
    expect(
      Object.keys(errors(journalClearanceReadingSchema.safeParse(strip({ method: "guess" })))),
    ).toEqual(["method"]);
  });

  it("reports every bad field at once", () => {
    expect(
      Object.keys(
        errors(journalClearanceReadingSchema.safeParse(strip({ journalId: "7", value: "abc" }))),
      ),
    ).toEqual(["journalId", "value"]);
  });

  it("refuses a journal larger than its bore, absurd diameters and an absurd difference", () => {
    const dia = (boreValue: string, journalValue: string) =>
      errors(
        journalClearanceReadingSchema.safeParse({
          journalId: id,
          method: "diameters",
          boreValue,
          journalValue,
          unit: "mm",
        }),
      );
    expect(Object.keys(dia("26.000", "26.010"))).toEqual(["journalValue"]);
    expect(Object.keys(dia("2600", "25.949"))).toEqual(["boreValue"]);
    expect(dia("26.000", "25.000").journalValue).toMatch(
      /1 mm, more than a plausible oil clearance/,
    );
  });
});

describe("clearanceSpecSchema", () => {
  it("parses a spec with an optional service limit", () => {
    const s = clearanceSpecSchema.parse({ min: "0.04", max: "0.08", serviceLimit: "", unit: "mm" });
    expect(s.serviceLimit).toBeUndefined();
    expect(clearanceSpecMm(s)).toEqual({ minMm: 0.04, maxMm: 0.08, serviceLimitMm: null });
    expect(
      clearanceSpecSchema.parse({ min: 0.04, max: 0.08, serviceLimit: 0.12, unit: "mm" })
        .serviceLimit,
    ).toBe(0.12);
    expect(clearanceSpecSchema.safeParse({ min: "0.05", max: "0.05", unit: "mm" }).success).toBe(
      true,
    );
  });

  it("refuses min above max on max, and a limit under max on the limit", () => {
    expect(
      Object.keys(errors(clearanceSpecSchema.safeParse({ min: "0.08", max: "0.04", unit: "mm" }))),
    ).toEqual(["max"]);
    expect(
      Object.keys(
        errors(
          clearanceSpecSchema.safeParse({
            min: "0.04",
            max: "0.08",
            serviceLimit: "0.06",
            unit: "mm",
          }),
        ),
      ),
    ).toEqual(["serviceLimit"]);
  });

  it("refuses absurd, negative and unit-less specs", () => {
    expect(
      Object.keys(errors(clearanceSpecSchema.safeParse({ min: "0.04", max: "5", unit: "mm" }))),
    ).toEqual(["max"]);
    expect(
      Object.keys(errors(clearanceSpecSchema.safeParse({ min: "-1", max: "0.08", unit: "mm" }))),
    ).toEqual(["min"]);
    expect(
      Object.keys(
        errors(clearanceSpecSchema.safeParse({ min: "0.04", max: "0.08", unit: "inch" })),
      ),
    ).toEqual(["unit"]);
  });
});

describe("measurementSchema", () => {
  const seatId = "5d1c9a3e-2b4f-4c6d-8e7f-9a0b1c2d3e4f";

  it("parses a seat contact width with its spec", () => {
    const m = measurementSchema.parse({
      kind: "seat_contact_width",
      seatId,
      value: "1.4",
      unit: "mm",
      spec: { min: "1.0", max: "1.6" },
    });
    expect(m.spec).toEqual({ min: 1.0, max: 1.6 });
    expect(measurementSi(m)).toEqual({ value: 1.4, min: 1.0, max: 1.6 });
  });

  it("treats a blank spec as no spec and blank optional ids as absent", () => {
    const m = measurementSchema.parse({
      kind: "deck_flatness",
      seatId: "",
      journalId: "",
      value: "0.03",
      unit: "mm",
      spec: { min: "", max: "" },
      method: "",
    });
    expect(m.spec).toBeUndefined();
    expect(m.seatId).toBeUndefined();
  });

  it("converts spring loads to newtons: 50 lbf = 222.41 N (NIST SP 811, 4.448 222 N/lbf)", () => {
    const m = measurementSchema.parse({ kind: "spring_load", seatId, value: "50", unit: "lbf" });
    expect(measurementSi(m).value).toBeCloseTo(222.4111, 4);
  });

  it("needs the method for stem-to-guide clearance and refuses it elsewhere", () => {
    const base = { kind: "stem_guide_clearance", seatId, value: "0.04", unit: "mm" };
    expect(Object.keys(errors(measurementSchema.safeParse(base)))).toEqual(["method"]);
    expect(measurementSchema.safeParse({ ...base, method: "rocking" }).success).toBe(true);
    expect(Object.keys(errors(measurementSchema.safeParse({ ...base, method: "wiggle" })))).toEqual(
      ["method"],
    );
    expect(
      Object.keys(
        errors(
          measurementSchema.safeParse({
            kind: "valve_stem_diameter",
            seatId,
            value: "5.5",
            unit: "mm",
            method: "direct",
          }),
        ),
      ),
    ).toEqual(["method"]);
  });

  it("needs a seat for seat measurements and refuses one on a head measurement", () => {
    expect(
      Object.keys(
        errors(
          measurementSchema.safeParse({ kind: "seat_contact_width", value: "1.4", unit: "mm" }),
        ),
      ),
    ).toEqual(["seatId"]);
    expect(
      Object.keys(
        errors(
          measurementSchema.safeParse({ kind: "deck_flatness", seatId, value: "0.03", unit: "mm" }),
        ),
      ),
    ).toEqual(["seatId"]);
    expect(
      Object.keys(
        errors(
          measurementSchema.safeParse({ kind: "journal_clearance", value: "0.05", unit: "mm" }),
        ),
      ),
    ).toEqual(["journalId"]);
  });

  it("refuses a unit of the wrong quantity, an unknown unit and an unknown kind", () => {
    expect(
      errors(measurementSchema.safeParse({ kind: "spring_load", seatId, value: "300", unit: "mm" }))
        .unit,
    ).toMatch(/is a force/);
    expect(
      errors(
        measurementSchema.safeParse({
          kind: "seat_contact_width",
          seatId,
          value: "1.4",
          unit: "N",
        }),
      ).unit,
    ).toMatch(/is a length/);
    expect(
      Object.keys(
        errors(
          measurementSchema.safeParse({
            kind: "seat_contact_width",
            seatId,
            value: "1.4",
            unit: "cm",
          }),
        ),
      ),
    ).toEqual(["unit"]);
    expect(
      Object.keys(
        errors(measurementSchema.safeParse({ kind: "bore_wear", value: "1", unit: "mm" })),
      ),
    ).toEqual(["kind"]);
  });

  it("refuses absurd values after unit conversion, and spec min above max", () => {
    // 14 mm is no seat width; 0.14 in = 3.556 mm is plausible (25.4 mm/in).
    expect(
      Object.keys(
        errors(
          measurementSchema.safeParse({
            kind: "seat_contact_width",
            seatId,
            value: "14",
            unit: "mm",
          }),
        ),
      ),
    ).toEqual(["value"]);
    expect(
      measurementSchema.safeParse({ kind: "seat_contact_width", seatId, value: "0.14", unit: "in" })
        .success,
    ).toBe(true);
    expect(
      Object.keys(
        errors(measurementSchema.safeParse({ kind: "deck_flatness", value: "2", unit: "mm" })),
      ),
    ).toEqual(["value"]);
    expect(
      Object.keys(
        errors(
          measurementSchema.safeParse({
            kind: "seat_contact_width",
            seatId,
            value: "1.4",
            unit: "mm",
            spec: { min: "1.6", max: "1.0" },
          }),
        ),
      ),
    ).toEqual(["spec.max"]);
  });
});

describe("torqueSheetSetupSchema", () => {
  const setup = (over: Record<string, unknown> = {}) => ({
    camshaftId: id,
    capCount: "5",
    boltsPerCap: "2",
    order: "centre-out",
    finalTorque: { value: "10", unit: "N·m" },
    ...over,
  });

  it("parses a centre-out sheet with the default stages", () => {
    expect(torqueSheetSetupSchema.parse(setup())).toEqual({
      camshaftId: id,
      capCount: 5,
      boltsPerCap: 2,
      order: "centre-out",
      finalTorque: { value: 10, unit: "N·m" },
      stageFractions: [0.3, 0.6, 1],
      stageMode: "fractions",
    });
  });

  it("parses an explicit order typed as a list", () => {
    const s = torqueSheetSetupSchema.parse(
      setup({ capCount: "3", boltsPerCap: 1, order: "c2, c1 C3", stageFractions: "0.5, 1" }),
    );
    expect(s.order).toEqual(["C2", "C1", "C3"]);
    expect(s.stageFractions).toEqual([0.5, 1]);
  });

  it("names each problem in an explicit order", () => {
    const e = torqueSheetSetupSchema.safeParse(
      setup({ capCount: 3, boltsPerCap: 1, order: ["C1", "C1", "C4"] }),
    );
    expect(e.success).toBe(false);
    const messages = e.success
      ? []
      : e.error.issues.filter((i) => i.path.join(".") === "order").map((i) => i.message);
    expect(messages).toEqual(
      expect.arrayContaining([
        expect.stringMatching(/^C1 appears 2 times/),
        expect.stringMatching(/^C4 is not a bolt/),
      ]),
    );
    expect(messages).toContain("C2 is missing from the order.");
  });

  it("refuses implausible torques after conversion, bad stages and bad layouts on their fields", () => {
    // 100 lbf·ft = 135.6 N·m is plausible; 200 lbf·ft = 271 N·m is not (NIST factor 1.355 818).
    expect(
      torqueSheetSetupSchema.safeParse(setup({ finalTorque: { value: "100", unit: "lbf·ft" } }))
        .success,
    ).toBe(true);
    expect(
      Object.keys(
        errors(
          torqueSheetSetupSchema.safeParse(
            setup({ finalTorque: { value: "200", unit: "lbf·ft" } }),
          ),
        ),
      ),
    ).toEqual(["finalTorque.value"]);
    expect(
      Object.keys(
        errors(
          torqueSheetSetupSchema.safeParse(setup({ finalTorque: { value: "10", unit: "Nm" } })),
        ),
      ),
    ).toEqual(["finalTorque.unit"]);
    expect(
      Object.keys(
        errors(
          torqueSheetSetupSchema.safeParse(setup({ finalTorque: { value: "-10", unit: "N·m" } })),
        ),
      ),
    ).toEqual(["finalTorque.value"]);
    expect(
      Object.keys(
        errors(torqueSheetSetupSchema.safeParse(setup({ stageFractions: [0.6, 0.3, 1] }))),
      ),
    ).toEqual(["stageFractions"]);
    expect(
      Object.keys(errors(torqueSheetSetupSchema.safeParse(setup({ stageFractions: [0.3, 0.6] })))),
    ).toEqual(["stageFractions"]);
    expect(
      Object.keys(errors(torqueSheetSetupSchema.safeParse(setup({ boltsPerCap: "3" })))),
    ).toEqual(["boltsPerCap"]);
    expect(
      Object.keys(errors(torqueSheetSetupSchema.safeParse(setup({ capCount: "2.5" })))),
    ).toEqual(["capCount"]);
    expect(Object.keys(errors(torqueSheetSetupSchema.safeParse(setup({ capCount: "" }))))).toEqual([
      "capCount",
    ]);
  });
});

describe("tickSchema", () => {
  it("parses a tick and normalises the bolt id", () => {
    expect(tickSchema.parse({ sheetId: id, stage: "2", boltId: " c3-l " })).toEqual({
      sheetId: id,
      stage: 2,
      boltId: "C3-L",
    });
  });

  it("refuses malformed ticks on their fields", () => {
    expect(
      Object.keys(errors(tickSchema.safeParse({ sheetId: id, stage: "0", boltId: "C3-L" }))),
    ).toEqual(["stage"]);
    expect(
      Object.keys(errors(tickSchema.safeParse({ sheetId: id, stage: "1", boltId: "bolt 3" }))),
    ).toEqual(["boltId"]);
    expect(
      Object.keys(errors(tickSchema.safeParse({ sheetId: id, stage: "1", boltId: "C13" }))),
    ).toEqual(["boltId"]);
    expect(
      Object.keys(errors(tickSchema.safeParse({ sheetId: "x", stage: "1", boltId: "C3" }))),
    ).toEqual(["sheetId"]);
  });
});
