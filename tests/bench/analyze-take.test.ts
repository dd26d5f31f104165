// "Use a recording" analyses a file as listening live does: the LiveAnalyzer in the capture
// worklet's blocks gives the offline analyzer's strokes (lib/audio keeps the two equal), the
// stop at the settling stroke is the bench screen's, and a take of a stage already settled
// keeps every stroke.
import { describe, expect, it } from "vitest";
import { analyzeRecording } from "@/lib/audio/analyzer";
import { decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { judgeSeat } from "@/lib/audio/verdict";
import { analyzeTake, mixDown } from "@/lib/bench/analyze-take";

const SR = 44100;
const session = synthesizeSession({
  sampleRate: SR,
  seed: 11,
  leadInS: 3.5,
  tailS: 1,
  strokes: decayingContrasts(16, 12, 0.3, 2.5).map((c) => ({ contrastDb: c, durationS: 0.7, gapS: 0.55 })),
});
// Offline analysis with a lead-in as long as the live room measurement (calibrationMs, 2 s)
// calibrates as the live analyzer does (tests/audio/live.test.ts).
const offline = analyzeRecording(session.samples, { sampleRate: SR, options: { leadInMs: 2000 } });

describe("analyzeTake", () => {
  it("hears the offline analyzer's strokes, to the bit, when nothing stops it", () => {
    // A stage already settled: listening live would not stop, so neither does the take.
    const settled = Array.from({ length: 6 }, () => ({ contrastDb: 0.2, flags: [], startS: 1 }));
    const take = analyzeTake({ samples: session.samples, sampleRate: SR, earlier: settled });
    expect(offline.strokes.length).toBe(16);
    expect(take.strokes).toEqual(offline.strokes);
    expect(take.afterSettled).toBe(0);
    expect(take.calibrated).toBe(true);
    expect(take.calibrationDisturbed).toBe(false);
    expect(take.durationS).toBeCloseTo(session.samples.length / SR, 6);
  });

  it("stops at the stroke that settles the stage, as the bench screen stops listening there", () => {
    const progress: number[] = [];
    const take = analyzeTake({ samples: session.samples, sampleRate: SR, onProgress: (p) => progress.push(p) });
    // The first prefix of the offline strokes that judgeSeat calls settled.
    const cut = offline.strokes.findIndex((_, i) => judgeSeat(offline.strokes.slice(0, i + 1)).state === "settled") + 1;
    expect(cut).toBeGreaterThan(4);
    expect(cut).toBeLessThan(16);
    expect(take.strokes).toEqual(offline.strokes.slice(0, cut));
    expect(take.afterSettled).toBe(16 - cut);
    expect(take.verdict.state).toBe("settled");
    expect(progress.at(-1)).toBe(1);
    expect(progress).toEqual([...progress].sort((a, b) => a - b));
  });

  it("counts the stage's earlier strokes toward the stop, as the live curve does", () => {
    const earlier = offline.strokes.slice(0, 8).map((s) => ({ contrastDb: s.contrastDb, flags: s.flags, startS: s.startS }));
    const take = analyzeTake({ samples: session.samples, sampleRate: SR, earlier });
    const alone = analyzeTake({ samples: session.samples, sampleRate: SR });
    // Eight high strokes in front delay nothing, but the verdict is over all of them.
    expect(take.verdict.judgedStrokes).toBe(8 + take.strokes.length);
    expect(take.strokes.length).toBeGreaterThanOrEqual(alone.strokes.length);
  });

  it("finds nothing in silence and says the room was measured", () => {
    const take = analyzeTake({ samples: new Float32Array(SR * 4), sampleRate: SR });
    expect(take.strokes).toEqual([]);
    expect(take.calibrated).toBe(true);
    expect(take.verdict.state).toBe("no-strokes");
  });

  it("mixes a stereo recording down to the mean of its channels", () => {
    expect(Array.from(mixDown([Float32Array.of(1, 0.5, -1), Float32Array.of(0, 0.5, 1, 9)]))).toEqual([0.5, 0.5, 0]);
    const mono = Float32Array.of(0.25);
    expect(mixDown([mono])).toBe(mono);
  });
});
