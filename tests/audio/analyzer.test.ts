import { describe, expect, it } from "vitest";
import { analyzeRecording } from "@/lib/audio/analyzer";
import { decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { decayingSession, firstHolding } from "./sessions";

// Measurement tolerance used to turn known contrasts into a window of strokes
// where the verdict may legitimately land: each contrast is measured to within
// about ±0.4 dB (checked below), so the rule can hold no earlier than it
// would with a 0.4 dB looser threshold and no later than with a 0.4 dB
// stricter one.
const TOL_DB = 0.4;
const TOL_SLOPE = 0.15;

describe.each([48000, 44100, 16000])("a decaying session at %i Hz", (sampleRate) => {
  const session = decayingSession(sampleRate);
  const result = analyzeRecording(session.samples, { sampleRate });

  it("finds every stroke, where it was made", () => {
    expect(result.strokes).toHaveLength(session.strokes.length);
    result.strokes.forEach((s, i) => {
      expect(Math.abs(s.startS - session.strokes[i].startS)).toBeLessThanOrEqual(0.01);
      expect(Math.abs(s.endS - session.strokes[i].endS)).toBeLessThanOrEqual(0.02);
    });
  });

  it("measures each stroke's contrast close to the contrast it was built with", () => {
    // A power estimated from 0.2 s and ~0.35 s of noise scatters by about
    // 0.15–0.2 dB (standard deviation); allow three of those per stroke, and
    // a small systematic offset on average.
    const errors = result.strokes.map((s, i) => s.contrastDb - session.strokes[i].contrastDb);
    errors.forEach((e, i) => expect(Math.abs(e)).toBeLessThanOrEqual(0.6 + 0.05 * session.strokes[i].contrastDb));
    const bias = errors.reduce((a, b) => a + b, 0) / errors.length;
    expect(Math.abs(bias)).toBeLessThanOrEqual(0.25);
  });

  it("settles inside the window the known contrasts allow", () => {
    const truths = session.strokes.map((s) => s.contrastDb);
    const earliest = firstHolding(truths, 1.5 + TOL_DB, 0.3 + TOL_SLOPE);
    const latest = firstHolding(truths, 1.5 - TOL_DB, 0.3 - TOL_SLOPE);
    expect(latest).toBeLessThan(Infinity);
    const settled = result.verdict.settled;
    expect(settled).not.toBeNull();
    expect(settled!.atStroke).toBeGreaterThanOrEqual(earliest);
    expect(settled!.atStroke).toBeLessThanOrEqual(latest);
    expect(settled!.atS).toBeCloseTo(result.strokes[settled!.atStroke - 1].startS, 9);
    expect(result.verdict.state).toBe("settled");
    expect(result.verdict.fit!.floorDb).toBeLessThan(1.5);
  });

  it("flags the band as narrowed only where 0.45 × rate is below 10 kHz", () => {
    expect(result.warnings.includes("low-sample-rate")).toBe(sampleRate * 0.45 < 10000);
    expect(result.warnings).not.toContain("clipping");
  });
});

describe("sessions that must not settle", () => {
  it("a session that stops early never settles, and is not called hopeless", () => {
    const s = synthesizeSession({
      sampleRate: 48000,
      seed: 3,
      strokes: decayingContrasts(8, 12, 0.3, 4).map((contrastDb) => ({ contrastDb })),
    });
    const r = analyzeRecording(s.samples, { sampleRate: 48000 });
    expect(r.strokes).toHaveLength(8);
    expect(r.verdict.settled).toBeNull();
    expect(r.verdict.notSettling).toBe(false);
    expect(r.verdict.state).toBe("fading");
    expect(r.verdict.strokesRemaining).toBeGreaterThan(0);
  });

  it("a contrast that flattens high never settles and reports not settling", () => {
    const s = synthesizeSession({
      sampleRate: 48000,
      seed: 4,
      strokes: decayingContrasts(16, 10, 4, 2).map((contrastDb) => ({ contrastDb })),
    });
    const r = analyzeRecording(s.samples, { sampleRate: 48000 });
    expect(r.strokes).toHaveLength(16);
    expect(r.verdict.settled).toBeNull();
    expect(r.verdict.notSettling).toBe(true);
    expect(r.verdict.state).toBe("not-settling");
    expect(r.verdict.fit!.floorDb).toBeGreaterThan(3);
    expect(r.verdict.strokesRemaining).toBeNull();
  });
});

describe("quality flags", () => {
  it("clipping is flagged on the strokes that clip and on the recording", () => {
    const s = synthesizeSession({
      sampleRate: 48000,
      seed: 9,
      gain: 12,
      strokes: decayingContrasts(6, 10, 0.5, 2).map((contrastDb) => ({ contrastDb })),
    });
    const r = analyzeRecording(s.samples, { sampleRate: 48000 });
    expect(r.warnings).toContain("clipping");
    expect(r.strokes.length).toBeGreaterThan(0);
    expect(r.strokes.some((st) => st.flags.includes("clipping"))).toBe(true);
  });

  it("a recording of room noise only has no strokes", () => {
    const s = synthesizeSession({ sampleRate: 48000, seed: 2, strokes: [], leadInS: 5 });
    const r = analyzeRecording(s.samples, { sampleRate: 48000 });
    expect(r.strokes).toHaveLength(0);
    expect(r.warnings).toContain("no-strokes");
    expect(r.verdict.state).toBe("no-strokes");
  });

  it("rejects sample rates outside 16–96 kHz, naming the rate", () => {
    expect(() => analyzeRecording(new Float32Array(100), { sampleRate: 8000 })).toThrow(/8000/);
  });
});
