import { describe, expect, it } from "vitest";
import { fadeAt, fitFade } from "@/lib/audio/fade";
import { resolveOptions } from "@/lib/audio/options";
import { firstSettledPosition, judgeSeat, leastSquaresSlope } from "@/lib/audio/verdict";

const o = resolveOptions();
const curve = (n: number, floor: number, amp: number, decay: number) =>
  Array.from({ length: n }, (_, k) => floor + amp * Math.exp(-k / decay));

describe("fade fit", () => {
  it("recovers the parameters of a noise-free decay exactly", () => {
    // Closed-form answer: the data are the model itself.
    const fit = fitFade(curve(15, 0.7, 11, 3.5))!;
    expect(fit.floorDb).toBeCloseTo(0.7, 4);
    expect(fit.amplitudeDb).toBeCloseTo(11, 4);
    expect(fit.decayStrokes).toBeCloseTo(3.5, 3);
    expect(fit.rmsErrorDb).toBeLessThan(1e-4);
    expect(fadeAt(fit, 1)).toBeCloseTo(11.7, 4);
  });

  it("finds the least-squares fit a brute-force search finds, on noisy curves of many lengths", () => {
    // Reference: for each of 20,000 decays spread evenly in log over 0.25–200 strokes, the
    // floor and amplitude come from the 2×2 normal equations with every exp() computed
    // directly, negative amplitudes clamped to a flat line as the fit does; the best sum of
    // squares wins. The fit must do at least as well (its search is finer near the minimum),
    // and no worse than the reference by more than rounding.
    let seed = 11;
    const rnd = () => (seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32;
    const sseOf = (y: number[], floor: number, amp: number, decay: number) =>
      y.reduce((sum, v, i) => sum + (v - (floor + amp * Math.exp(-i / decay))) ** 2, 0);
    for (const n of [3, 5, 12, 40, 120, 400]) {
      const y = Array.from({ length: n }, (_, i) => 0.4 + 12 * rnd() * Math.exp(-i / (1 + rnd() * 15)) + (rnd() - 0.5) * 1.5);
      let bestSse = Infinity;
      for (let s = 0; s <= 20000; s++) {
        const decay = Math.exp(Math.log(0.25) + ((Math.log(200) - Math.log(0.25)) * s) / 20000);
        let se = 0, see = 0, sy = 0, sey = 0;
        y.forEach((v, i) => {
          const e = Math.exp(-i / decay);
          se += e; see += e * e; sy += v; sey += e * v;
        });
        const det = n * see - se * se;
        let amp = Math.abs(det) < 1e-12 ? 0 : (n * sey - se * sy) / det;
        let floor = (sy - amp * se) / n;
        if (amp < 0) [amp, floor] = [0, sy / n];
        bestSse = Math.min(bestSse, sseOf(y, floor, amp, decay));
      }
      const fit = fitFade(y)!;
      const fitSse = sseOf(y, fit.floorDb, fit.amplitudeDb, fit.decayStrokes);
      expect(fitSse).toBeLessThanOrEqual(bestSse * (1 + 1e-9) + 1e-12);
      expect(fit.rmsErrorDb).toBeCloseTo(Math.sqrt(fitSse / n), 9);
    }
  });

  it("fits a constant as a flat curve at its value", () => {
    const fit = fitFade([3, 3, 3, 3, 3])!;
    expect(fadeAt(fit, 1)).toBeCloseTo(3, 9);
    expect(fadeAt(fit, 50)).toBeCloseTo(3, 9);
  });

  it("never models a rising curve as a fade", () => {
    const fit = fitFade([1, 2, 3, 4, 5])!;
    expect(fit.amplitudeDb).toBe(0);
    expect(fit.floorDb).toBeCloseTo(3, 9);
  });

  it("needs three strokes and rejects non-finite contrasts, naming the stroke", () => {
    expect(fitFade([5, 4])).toBeNull();
    expect(() => fitFade([5, Number.NaN, 3])).toThrow(/stroke 2/);
  });
});

describe("verdict", () => {
  it("least-squares slope of a straight line is its slope", () => {
    expect(leastSquaresSlope([1, 1.5, 2, 2.5], 0, 4)).toBeCloseTo(0.5, 12);
  });

  it("settles at the first stroke where the last four are ≤ 1.5 dB and flat", () => {
    const contrasts = [9, 6, 4, 2.5, 1.6, 1.4, 1.2, 1.1, 1.0, 1.0];
    // Strokes 6–9 (1.4, 1.2, 1.1, 1.0; slope −0.13 dB/stroke) are the first
    // four all ≤ 1.5 dB; strokes 5–8 still include 1.6. So: stroke 9.
    expect(firstSettledPosition(contrasts, o)).toBe(8);
    const v = judgeSeat(contrasts.map((contrastDb, i) => ({ contrastDb, startS: 10 * i })));
    expect(v.settled).toEqual({ atStroke: 9, atS: 80 });
    expect(v.state).toBe("settled");
    expect(v.strokesRemaining).toBe(0);
  });

  it("does not settle on four low values that still fall steeply", () => {
    // slope of 1.5, 1.0, 0.5, 0.0 is -0.5 dB/stroke, outside ±0.3.
    expect(firstSettledPosition([1.5, 1.0, 0.5, 0.0], o)).toBe(-1);
  });

  it("says not settling only after 12 strokes flat above the threshold", () => {
    const high = curve(16, 4, 6, 2).map((contrastDb) => ({ contrastDb }));
    expect(judgeSeat(high.slice(0, 11)).notSettling).toBe(false);
    const v = judgeSeat(high);
    expect(v.notSettling).toBe(true);
    expect(v.state).toBe("not-settling");
    expect(v.settled).toBeNull();
  });

  it("estimates the strokes remaining from the fitted curve", () => {
    // On noise-free model data the fit is exact, so the remaining count after
    // 8 strokes is where the rule first holds on the full model curve, minus 8.
    const all = curve(30, 0.3, 11.7, 4);
    const settledAt = firstSettledPosition(all, o) + 1;
    const v = judgeSeat(all.slice(0, 8).map((contrastDb) => ({ contrastDb })));
    expect(v.state).toBe("fading");
    expect(v.strokesRemaining).toBe(settledAt - 8);
  });

  it("leaves too-quiet strokes out and keeps stroke numbers", () => {
    const strokes = [5, 3, 1, 1, 1, 1].map((contrastDb, i) => ({ contrastDb, index: i + 1, flags: [] as string[] }));
    strokes.splice(3, 0, { contrastDb: 9, index: 99, flags: ["too-quiet"] });
    const v = judgeSeat(strokes);
    expect(v.judgedStrokes).toBe(6);
    expect(v.settled?.atStroke).toBe(6);
  });

  it("rejects a stroke without a finite contrast, naming it", () => {
    expect(() => judgeSeat([{ contrastDb: 1 }, { contrastDb: Number.POSITIVE_INFINITY, index: 7 }])).toThrow(/stroke 7/);
  });
});
