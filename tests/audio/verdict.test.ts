import { describe, expect, it } from "vitest";
import { impulsive, steadyBody } from "@/lib/audio/analyzer";
import { resolveOptions } from "@/lib/audio/options";
import { createRandom, decayingContrasts } from "@/lib/audio/synth";
import { judgeSeat, STROKE_FLAGS } from "@/lib/audio/verdict";

const o = resolveOptions();

describe("flagged strokes are left out of the verdict, and counted", () => {
  it("any flag leaves a stroke out; stroke numbers are kept", () => {
    const contrasts = decayingContrasts(24, 10, 0.3, 3);
    const strokes = contrasts.map((contrastDb, i) => ({ contrastDb, index: i + 1, flags: [] as string[] }));
    // A wildly wrong contrast on each flagged stroke: were it judged, the seat could not settle.
    const flaggedAt = [2, 6, 9, 12, 14, 16];
    flaggedAt.forEach((k, j) => {
      strokes[k] = { contrastDb: 25, index: k + 1, flags: [STROKE_FLAGS[j % STROKE_FLAGS.length]] };
    });
    strokes[9].flags.push("speech");
    const v = judgeSeat(strokes);
    expect(v.judgedStrokes).toBe(24 - flaggedAt.length);
    expect(v.leftOutStrokes).toBe(flaggedAt.length);
    expect(v.leftOutByFlag).toEqual({ clipping: 1, "too-quiet": 1, speech: 2, impulsive: 1, "start-not-heard": 1, "end-not-heard": 1 });
    const clean = judgeSeat(strokes.filter((s) => s.flags.length === 0).map(({ contrastDb }) => ({ contrastDb })));
    expect(clean.state).toBe("settled");
    expect(v.state).toBe(clean.state);
    expect(v.fit).toEqual(clean.fit);
    // Settled at the same judged stroke, named by its own number.
    expect(v.settled?.atStroke).toBe(strokes.filter((s) => s.flags.length === 0)[clean.settled!.atStroke - 1].index);
  });

  it("only flagged strokes give no verdict, never settled", () => {
    const v = judgeSeat([0.1, 0.2, 0.1, 0.1, 0.2].map((contrastDb) => ({ contrastDb, flags: ["speech"] })));
    expect(v.state).toBe("no-strokes");
    expect(v.settled).toBeNull();
    expect(v.leftOutStrokes).toBe(5);
  });
});

describe("the strokes-remaining forecast", () => {
  it("is shown only once stable, and two shown in a row never differ by more than a factor of two", () => {
    const rand = createRandom(31);
    let shownPairs = 0;
    for (let run = 0; run < 300; run++) {
      const start = 6 + 10 * rand();
      const decay = 2 + 8 * rand();
      const noise = 0.2 + 1.2 * rand();
      const truth = decayingContrasts(40, start, 0.2, decay);
      const values = truth.map((c) => c + noise * (rand() + rand() + rand() - 1.5));
      let last: number | null = null;
      for (let n = 1; n <= values.length; n++) {
        const v = judgeSeat(values.slice(0, n).map((contrastDb) => ({ contrastDb })));
        if (v.state !== "fading") {
          last = null;
          continue;
        }
        if (v.strokesRemaining === null) {
          expect(v.forecastStable).toBe(false);
          last = null;
          continue;
        }
        expect(v.forecastStable).toBe(true);
        if (last !== null) {
          shownPairs++;
          const a = Math.max(1, last);
          const b = Math.max(1, v.strokesRemaining);
          expect(Math.max(a / b, b / a), `run ${run} stroke ${n}: ${last} then ${v.strokesRemaining}`).toBeLessThanOrEqual(2);
        }
        last = v.strokesRemaining;
      }
    }
    // The property was exercised, not skipped.
    expect(shownPairs).toBeGreaterThan(500);
  });

  it("a clean exponential fade gets a forecast that counts down", () => {
    const values = decayingContrasts(12, 12, 0.2, 4);
    const shown = values.map((_, n) => judgeSeat(values.slice(0, n + 1).map((contrastDb) => ({ contrastDb }))).strokesRemaining);
    const numbers = shown.filter((r): r is number => r !== null && r > 0);
    expect(numbers.length).toBeGreaterThan(3);
    for (let i = 1; i < numbers.length; i++) expect(numbers[i]).toBeLessThanOrEqual(numbers[i - 1]);
  });
});

describe("knocks and rattles (closed-form hop series)", () => {
  const steady = (n: number) => ({ powers: new Float64Array(n).fill(1e-4), kurtosis: new Float64Array(n).fill(3) });

  it("steady noise is not impulsive", () => expect(impulsive(steady(300), o)).toBe(false));

  it("a smooth onset burst decaying over 120 ms is not impulsive", () => {
    const h = steady(300);
    for (let i = 0; i < 300; i++) h.powers[i] = 1e-4 * (1 + 30 * Math.exp(-(i * 0.005) / 0.12));
    expect(impulsive(h, o)).toBe(false);
  });

  it("three spikes 6 dB over their neighbours are; two are not", () => {
    const h = steady(300);
    for (const i of [50, 120]) h.powers[i] = 4e-4;
    expect(impulsive(h, o)).toBe(false);
    h.powers[200] = 4e-4;
    expect(impulsive(h, o)).toBe(true);
  });

  it("one knock 15 dB over its neighbours (10 dB past the spike threshold) is enough", () => {
    const h = steady(300);
    h.powers[150] = 1e-4 * 10 ** 1.5;
    expect(impulsive(h, o)).toBe(true);
  });

  it("clicks too short to lift a hop's power still show in its kurtosis, past the first hops", () => {
    const h = steady(300);
    for (const i of [0, 1, 2]) h.kurtosis[i] = 12;
    expect(impulsive(h, o)).toBe(false);
    for (const i of [40, 80, 120]) h.kurtosis[i] = 8;
    expect(impulsive(h, o)).toBe(true);
  });

  it("a body whose grind band comes and goes is not steady", () => {
    expect(steadyBody([1, 1, 1, 1, 1.5, 0.8, 1.2, 1], 8)).toBe(true);
    expect(steadyBody([1, 1, 1e-3, 1, 1e-3, 1e-3, 1, 1e-3], 8)).toBe(false);
  });
});

describe("new options are validated, naming the bad value", () => {
  it.each([
    [{ voiceBandLowHz: 2000, voiceBandHighHz: 1000 }, /voiceBandLowHz/],
    [{ minBandSnrDb: 200 }, /minBandSnrDb/],
    [{ impulseMinSpikes: 1.5 }, /impulseMinSpikes/],
    [{ splitRiseDb: 0 }, /splitRiseDb/],
    [{ forecastStableStrokes: 0 }, /forecastStableStrokes/],
  ])("%o", (input, message) => expect(() => resolveOptions(input)).toThrow(message));
});
