import { describe, expect, it } from "vitest";
import { ANALYSIS_DEFAULTS, resolveOptions } from "@/lib/audio/options";

describe("analysis options", () => {
  it("the defaults are frozen and valid", () => {
    expect(Object.isFrozen(ANALYSIS_DEFAULTS)).toBe(true);
    expect(resolveOptions()).toEqual(ANALYSIS_DEFAULTS);
    expect(ANALYSIS_DEFAULTS.onsetWindowMs).toBe(200);
    expect(ANALYSIS_DEFAULTS.highBandLowHz).toBe(2000);
    expect(ANALYSIS_DEFAULTS.highBandHighHz).toBe(10000);
    expect(ANALYSIS_DEFAULTS.minStrokeMs).toBe(300);
  });

  it.each([
    [{ hopMs: 6 }, /hopMs must be in \[0.5, 5\], got 6/],
    [{ onsetWindowMs: "200" }, /onsetWindowMs must be a finite number, got "200"/],
    [{ minStrokeMs: Number.NaN }, /minStrokeMs must be a finite number, got NaN/],
    [{ settledStrokes: 3.5 }, /settledStrokes must be a whole number, got 3.5/],
    [{ highBandLowHz: 12000 }, /highBandLowHz \(12000\) must be below highBandHighHz \(10000\)/],
    [{ strokeEndAboveFloorDb: 20 }, /strokeEndAboveFloorDb \(20\) must not exceed strokeStartAboveFloorDb \(10\)/],
    [{ bodyStartFraction: 0.8 }, /bodyStartFraction \(0.8\) must be below bodyEndFraction \(0.75\)/],
    [{ onsetWindowMS: 200 }, /unknown analysis option "onsetWindowMS"/],
  ])("rejects %o", (input, message) => {
    expect(() => resolveOptions(input)).toThrow(message);
  });

  it("rejects a non-object", () => {
    expect(() => resolveOptions(42)).toThrow(/must be an object, got 42/);
  });
});
