import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyzeRecording, type AnalysisResult } from "@/lib/audio/analyzer";
import { resolveOptions } from "@/lib/audio/options";
import { StrokeSegmenter } from "@/lib/audio/strokes";
import { createRandom, type SynthSession } from "@/lib/audio/synth";
import { aubioOnsets, espeakSpeech, scratchDir, skipWithout, writeWav } from "./helpers";
import { decayingSession, sessionWithPauses } from "./sessions";

const scratch = scratchDir();
afterAll(() => scratch.cleanup());
const o = resolveOptions();

describe("segmentation on signals with known answers", () => {
  it("silence and steady room noise give no strokes", () => {
    const seg = new StrokeSegmenter(o, 4);
    seg.setNoiseFloor(-60);
    for (let h = 0; h < 1000; h++) expect(seg.step(h, 1e-6)).toBeNull();
    expect(seg.finish()).toBeNull();
  });

  it("a 0.6 s noise burst is one stroke starting within 10 ms of its true start", () => {
    const fs = 48000;
    const rand = createRandom(1);
    const x = new Float32Array(fs * 3);
    for (let i = 0; i < x.length; i++) x[i] = 0.001 * (2 * rand() - 1);
    const start = Math.round(1.2345 * fs);
    for (let i = start; i < start + 0.6 * fs; i++) x[i] += 0.05 * (2 * rand() - 1);
    const r = analyzeRecording(x, { sampleRate: fs });
    expect(r.strokes).toHaveLength(1);
    expect(Math.abs(r.strokes[0].startS - 1.2345)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(r.strokes[0].endS - 1.8345)).toBeLessThanOrEqual(0.01);
    // Steady noise has no burst: its contrast is near 0 dB.
    expect(Math.abs(r.strokes[0].contrastDb)).toBeLessThan(0.5);
  });

  it("dips shorter than a lift are the reversal of one stroke, longer ones split it", () => {
    const fs = 16000;
    const rand = createRandom(2);
    const make = (gapS: number) => {
      const x = new Float32Array(fs * 4);
      for (let i = 0; i < x.length; i++) {
        const t = i / fs;
        const on = (t > 1 && t < 1.6) || (t > 1.6 + gapS && t < 2.4 + gapS);
        x[i] = (on ? 0.05 : 0.0005) * (2 * rand() - 1);
      }
      return analyzeRecording(x, { sampleRate: fs }).strokes.length;
    };
    expect(make(0.04)).toBe(1);
    expect(make(0.4)).toBe(2);
  });
});

describe("rejecting what is not lapping", () => {
  it("a dropped tool's ring (tonal, long decay) and a tap (short) are not strokes", () => {
    const s = sessionWithPauses(48000, (p) => [
      { kind: "ring", atS: p.strokes[3].endS + 0.5 },
      { kind: "tap", atS: p.strokes[7].endS + 1 },
      { kind: "tap", atS: p.strokes[7].endS + 3, levelDbfs: -6 },
    ]);
    const r = analyzeRecording(s.samples, { sampleRate: 48000 });
    expect(r.strokes).toHaveLength(s.strokes.length);
    const reasons = r.rejected.map((x) => x.reason).sort();
    expect(reasons).toContain("not-noise-like");
    expect(reasons.filter((x) => x === "too-short")).toHaveLength(2);
    expect(r.warnings).toContain("ignored-sounds");
  });

  describe.skipIf(skipWithout("espeak-ng") || skipWithout("sox"))("real speech in the pauses (espeak-ng, Debian)", () => {
    for (const rate of [48000, 16000]) {
      it(`is not counted as a stroke at ${rate} Hz`, () => {
        const a = espeakSpeech("Pass me the fine compound, this seat is nearly done.", rate, scratch.dir, `a${rate}`);
        const b = espeakSpeech("Cylinder three, exhaust valve, coarse stage.", rate, scratch.dir, `b${rate}`);
        const s = sessionWithPauses(rate, (p) => [
          { kind: "speech", atS: p.strokes[3].endS + 0.5, samples: a, levelDbfs: -28 },
          { kind: "speech", atS: p.strokes[7].endS + 0.6, samples: b, levelDbfs: -24 },
        ]);
        const r = analyzeRecording(s.samples, { sampleRate: rate });
        expect(r.strokes).toHaveLength(s.strokes.length);
        r.strokes.forEach((st, i) => expect(Math.abs(st.startS - s.strokes[i].startS)).toBeLessThan(0.02));
        expect(r.rejected.filter((x) => x.reason === "not-noise-like").length).toBeGreaterThan(0);
      });
    }
  });
});

describe.skipIf(skipWithout("aubioonset") || skipWithout("espeak-ng") || skipWithout("sox"))(
  "stroke starts against Debian's aubioonset (-O hfc -M 0.3)",
  () => {
    const cases: { name: string; session: SynthSession; rate: number }[] = [];
    const results: AnalysisResult[] = [];
    beforeAll(() => {
      const speech = espeakSpeech("Hand me the suction stick and the fine paste.", 44100, scratch.dir, "aubio");
      cases.push({ name: "48 kHz decaying", session: decayingSession(48000, 20, 21), rate: 48000 });
      cases.push({
        name: "44.1 kHz with speech and a ring",
        rate: 44100,
        session: sessionWithPauses(44100, (p) => [
          { kind: "speech", atS: p.strokes[3].endS + 0.5, samples: speech, levelDbfs: -28 },
          { kind: "ring", atS: p.strokes[7].endS + 0.5 },
        ]),
      });
      cases.push({ name: "16 kHz decaying", session: decayingSession(16000, 16, 22), rate: 16000 });
      for (const c of cases) results.push(analyzeRecording(c.session.samples, { sampleRate: c.rate }));
    });

    it("at least 95% of our stroke starts lie within ±50 ms of an aubio onset", () => {
      // Tolerance window of ±50 ms: the usual onset-evaluation window
      // (mir_eval's default; Bello et al., IEEE TSAP 2005).
      cases.forEach((c, k) => {
        const path = scratch.path(`aubio-${k}.wav`);
        writeWav(path, c.session.samples, c.rate);
        const onsets = aubioOnsets(path);
        const ours = results[k].strokes.map((s) => s.startS);
        expect(ours.length, c.name).toBe(c.session.strokes.length);
        const matched = ours.filter((t) => onsets.some((a) => Math.abs(a - t) <= 0.05)).length;
        expect(matched / ours.length, c.name).toBeGreaterThanOrEqual(0.95);
      });
    });
  },
);
