import { describe, expect, it } from "vitest";
import { analyzeRecording, analyzeWavBytes } from "@/lib/audio/analyzer";
import { decodeWavMono, encodeWav } from "@/lib/audio/wav";
import { createLiveAnalyzer, SPECTRA_PER_128_SAMPLES, type LiveAnalyzer, type LiveEvent } from "@/lib/audio/live";
import { planStroke } from "@/lib/audio/contrast";
import { frameSizeFor } from "@/lib/audio/frames";
import { resolveOptions, type AnalysisOptionsInput } from "@/lib/audio/options";
import { createRandom, decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { decayingSession, sessionWithPauses } from "./sessions";

function pushAll(live: LiveAnalyzer, samples: Float32Array, nextSize: () => number): LiveEvent[] {
  const events: LiveEvent[] = [];
  for (let at = 0; at < samples.length; ) {
    const n = Math.min(samples.length - at, nextSize());
    events.push(...live.push(samples.subarray(at, at + n)));
    at += n;
  }
  events.push(...live.flush());
  return events;
}

function randomSizes(seed: number): () => number {
  const r = createRandom(seed);
  return () => 1 + Math.floor(r() * 3000);
}

const strokesOf = (events: LiveEvent[]) => events.flatMap((e) => (e.type === "stroke" ? [e.stroke] : []));
const rejectedOf = (events: LiveEvent[]) => events.flatMap((e) => (e.type === "rejected" ? [e.sound] : []));

describe("live analyzer gives the offline analyzer's strokes", () => {
  const session = sessionWithPauses(44100, (p) => [
    { kind: "ring", atS: p.strokes[3].endS + 0.5 },
    { kind: "tap", atS: p.strokes[7].endS + 1 },
  ]);
  const offlineLeadIn = analyzeRecording(session.samples, { sampleRate: 44100, options: { leadInMs: 2000 } });

  const blockings: [string, () => number][] = [
    ["128-sample blocks", () => 128],
    ["blocks of random size", randomSizes(17)],
    ["one block", () => Number.MAX_SAFE_INTEGER],
  ];
  it.each(blockings)("after a 2 s calibration, pushed in %s", (_label, size) => {
    const live = createLiveAnalyzer({ sampleRate: 44100 });
    expect(live.state).toBe("calibrating");
    const events = pushAll(live, session.samples, size);
    const cal = events.find((e) => e.type === "calibrated");
    expect(cal && cal.type === "calibrated" && cal.noiseFloorDbfs).toBe(offlineLeadIn.noiseFloorDbfs);
    // The band floors too, to the bit: the same quiet frames, measured alike.
    expect(cal && cal.type === "calibrated" && cal.noiseFloors).toEqual(offlineLeadIn.noiseFloors);
    // Offline analysis with a lead-in runs the live analyzer (the lead-in is its calibration);
    // the offline loop, given the floors the calibration found, is the independent check.
    if (cal?.type !== "calibrated") throw new Error("no calibration");
    const loop = analyzeRecording(session.samples, { sampleRate: 44100, noiseFloorDbfs: cal.noiseFloors, options: { leadInMs: 2000 } });
    expect(loop.noiseFloorSource).toBe("given");
    expect(strokesOf(events)).toEqual(loop.strokes);
    expect(rejectedOf(events)).toEqual(loop.rejected);
    expect(strokesOf(events)).toEqual(offlineLeadIn.strokes);
    expect(rejectedOf(events)).toEqual(offlineLeadIn.rejected);
    expect(live.strokes).toEqual(offlineLeadIn.strokes);
    expect(offlineLeadIn.strokes).toHaveLength(session.strokes.length);
  });

  it("with the floors the offline analyzer estimated from the pauses", () => {
    const offline = analyzeRecording(session.samples, { sampleRate: 44100 });
    expect(offline.noiseFloorSource).toBe("quietest-frames");
    const live = createLiveAnalyzer({ sampleRate: 44100, noiseFloorDbfs: offline.noiseFloors });
    expect(live.state).toBe("listening");
    expect(strokesOf(pushAll(live, session.samples, () => 128))).toEqual(offline.strokes);
  });

  it("reports each stroke within a lift and a window of its end", () => {
    const s = decayingSession(48000, 6, 3);
    const live = createLiveAnalyzer({ sampleRate: 48000 });
    let t = 0;
    for (let at = 0; at < s.samples.length; at += 128) {
      for (const e of live.push(s.samples.subarray(at, at + 128))) {
        if (e.type !== "stroke") continue;
        const now = (at + 128) / 48000;
        // minLiftMs (100) + the 20 ms level window + one hop + one block.
        expect(now - e.stroke.endS).toBeLessThanOrEqual(0.1 + 0.02 + 0.005 + 128 / 48000 + 1e-9);
        t++;
      }
    }
    expect(t).toBe(6);
  });

  it("reset forgets strokes, time and calibration", () => {
    const s = decayingSession(48000, 4, 5);
    const live = createLiveAnalyzer({ sampleRate: 48000 });
    const first = strokesOf(pushAll(live, s.samples, () => 512));
    live.reset();
    expect(live.strokes).toHaveLength(0);
    expect(live.timeS).toBe(0);
    expect(live.state).toBe("calibrating");
    expect(strokesOf(pushAll(live, s.samples, () => 128))).toEqual(first);
  });

  it("returns the same frozen empty list when nothing completed", () => {
    const live = createLiveAnalyzer({ sampleRate: 48000 });
    const a = live.push(new Float32Array(128));
    const b = live.push(new Float32Array(128));
    expect(a).toBe(b);
    expect(Object.isFrozen(a)).toBe(true);
  });

  it("validates its inputs, naming the bad value", () => {
    expect(() => createLiveAnalyzer({ sampleRate: 22050.5 })).toThrow(/22050.5/);
    expect(() => createLiveAnalyzer({ sampleRate: 48000, options: { hopMs: 9 } })).toThrow(/hopMs.*9/);
    const live = createLiveAnalyzer({ sampleRate: 48000 });
    expect(() => live.startCalibration(20)).toThrow(/20/);
    expect(() => live.setNoiseFloor(Number.NaN)).toThrow(/NaN/);
  });
});

/**
 * Push in blocks, checking each push against the spectra budget; returns the
 * events, flush included. `delays` gets, for each stroke reported by a push,
 * the seconds from its end to the end of that push.
 */
function pushWithinBudget(live: LiveAnalyzer, samples: Float32Array, nextSize: () => number, delays: number[] = []): LiveEvent[] {
  const events: LiveEvent[] = [];
  let most = 0;
  for (let at = 0; at < samples.length; ) {
    const n = Math.min(samples.length - at, nextSize());
    for (const e of live.push(samples.subarray(at, at + n))) {
      events.push(e);
      if (e.type === "stroke") delays.push((at + n) / live.sampleRate - e.stroke.endS);
    }
    const allowed = Math.max(SPECTRA_PER_128_SAMPLES, Math.floor((n * SPECTRA_PER_128_SAMPLES) / 128));
    if (live.lastPushSpectra > allowed) throw new Error(`a push of ${n} samples computed ${live.lastPushSpectra} spectra (allowed ${allowed})`);
    most = Math.max(most, live.lastPushSpectra);
    at += n;
  }
  events.push(...live.flush());
  expect(most).toBeGreaterThan(0);
  return events;
}

/** Spectra the offline analyzer computes for these strokes. */
/** Spectra offline analysis computes for these strokes, plus the calibration's band-floor frames (one per whole frame of it). */
function offlineSpectra(strokes: readonly { startS: number; endS: number }[], sampleRate: number, input: AnalysisOptionsInput): number {
  const o = resolveOptions(input);
  const n = frameSizeFor(sampleRate, o.frameTargetMs);
  const hop = Math.round((sampleRate * o.hopMs) / 1000);
  let count = Math.floor((Math.floor(Math.round((sampleRate * o.calibrationMs) / 1000) / hop) * hop) / n);
  for (const st of strokes) count += planStroke(0, Math.round((st.endS - st.startS) * sampleRate), n, sampleRate, o).at.length;
  return count;
}

describe("live analyzer spreads a stroke's spectra over the blocks while it sounds", () => {
  it("no 128-sample block computes more than the budget, and no stroke is reported later than without one", () => {
    const s = sessionWithPauses(48000, (p) => [
      { kind: "ring", atS: p.strokes[3].endS + 0.5 },
      { kind: "tap", atS: p.strokes[7].endS + 1 },
    ]);
    const offline = analyzeRecording(s.samples, { sampleRate: 48000, options: { leadInMs: 2000 } });
    const live = createLiveAnalyzer({ sampleRate: 48000 });
    let at = 0;
    const events: LiveEvent[] = [];
    for (; at < s.samples.length; at += 128) {
      for (const e of live.push(s.samples.subarray(at, at + 128))) {
        events.push(e);
        if (e.type !== "stroke") continue;
        // The lift, the level window, a hop and a block: when the close is heard.
        expect((at + 128) / 48000 - e.stroke.endS).toBeLessThanOrEqual(0.1 + 0.02 + 0.005 + 128 / 48000 + 1e-9);
      }
      expect(live.lastPushSpectra).toBeLessThanOrEqual(SPECTRA_PER_128_SAMPLES);
    }
    events.push(...live.flush());
    expect(strokesOf(events)).toEqual(offline.strokes);
    expect(rejectedOf(events)).toEqual(offline.rejected);
  });

  it("computes each frame of steady strokes once, as offline analysis does", () => {
    const s = decayingSession(48000, 8, 9);
    const offline = analyzeRecording(s.samples, { sampleRate: 48000, options: { leadInMs: 2000 } });
    expect(offline.rejected).toHaveLength(0);
    const live = createLiveAnalyzer({ sampleRate: 48000 });
    expect(strokesOf(pushWithinBudget(live, s.samples, () => 128))).toEqual(offline.strokes);
    expect(live.spectraComputed).toBe(offlineSpectra(offline.strokes, 48000, {}));
  });

  it.each([
    ["blocks of random size", randomSizes(29)],
    ["single samples", () => 1],
  ])("pushed in %s, each push keeps to its share of the budget", (_label, size) => {
    const s = decayingSession(44100, 5, 11);
    const offline = analyzeRecording(s.samples, { sampleRate: 44100, options: { leadInMs: 2000 } });
    const live = createLiveAnalyzer({ sampleRate: 44100 });
    expect(strokesOf(pushWithinBudget(live, s.samples, size))).toEqual(offline.strokes);
    expect(offline.strokes).toHaveLength(5);
  });

  it("a dip shorter than the lift (a reversal) discards the body measured during it and still gives the offline strokes", () => {
    const s = decayingSession(48000, 6, 13);
    const samples = s.samples.slice();
    // 40 ms of near silence in the middle of every stroke: below the exit
    // level long enough to start a lift, too short to end the stroke.
    for (const t of s.strokes) {
      const mid = Math.round(((t.startS + t.endS) / 2) * 48000);
      for (let i = mid; i < mid + 1920; i++) samples[i] *= 1e-3;
    }
    const offline = analyzeRecording(samples, { sampleRate: 48000, options: { leadInMs: 2000 } });
    expect(offline.strokes).toHaveLength(6);
    const live = createLiveAnalyzer({ sampleRate: 48000 });
    const delays: number[] = [];
    expect(strokesOf(pushWithinBudget(live, samples, () => 128, delays))).toEqual(offline.strokes);
    // The body frames of each dip's would-be end were measured in vain…
    expect(live.spectraComputed).toBeGreaterThan(offlineSpectra(offline.strokes, 48000, {}));
    // …and those of the real end during the real lift: each stroke is
    // reported once its lift, the level window, a hop and a block are heard.
    expect(delays).toHaveLength(6);
    for (const d of delays) expect(d).toBeLessThanOrEqual(0.1 + 0.02 + 0.005 + 128 / 48000 + 1e-9);
  });

  // Too few body frames for maxBodyFrames: other onset frames give the
  // flatness than those measured as the onset arrived. The lift measures
  // them again; with a one-hop lift the judgement does.
  it.each([
    ["the default lift", {}],
    ["a one-hop lift", { minLiftMs: 5, strokeEndAboveFloorDb: 9 }],
  ])("short strokes, whose flatness frames differ from a long stroke's, give the offline strokes with %s", (_label, extra) => {
    const spec = {
      sampleRate: 48000,
      seed: 3,
      strokes: decayingContrasts(8, 10, 0.3, 3).map((contrastDb, i) => ({ contrastDb, durationS: 0.35 + 0.03 * i })),
    };
    const s = synthesizeSession(spec);
    const options = { leadInMs: 2000, ...extra };
    const offline = analyzeRecording(s.samples, { sampleRate: 48000, options });
    expect(offline.strokes).toHaveLength(8);
    const live = createLiveAnalyzer({ sampleRate: 48000, options: { ...options, calibrationMs: 2000 } });
    expect(strokesOf(pushWithinBudget(live, s.samples, () => 128))).toEqual(offline.strokes);
  });

  it("strokes shorter than the onset window measure only frames inside them, as offline", () => {
    const spec = {
      sampleRate: 48000,
      seed: 4,
      strokes: decayingContrasts(6, 10, 0.3, 3).map((contrastDb, i) => ({ contrastDb, durationS: 0.12 + 0.01 * i })),
    };
    const s = synthesizeSession(spec);
    const options = { leadInMs: 2000, minStrokeMs: 50 };
    const offline = analyzeRecording(s.samples, { sampleRate: 48000, options });
    expect(offline.strokes).toHaveLength(6);
    const live = createLiveAnalyzer({ sampleRate: 48000, options: { ...options, calibrationMs: 2000 } });
    expect(strokesOf(pushWithinBudget(live, s.samples, () => 128))).toEqual(offline.strokes);
  });

  it("with a lift too short to measure the body in, judgements wait for later blocks, in order", () => {
    // One hop of lift: the close is heard a block or two after the sound
    // stops, before the budget has covered the body.
    const options = { leadInMs: 2000, minLiftMs: 5, strokeEndAboveFloorDb: 9 };
    const s = sessionWithPauses(48000, (p) => [{ kind: "tap", atS: p.strokes[3].endS + 1 }]);
    const offline = analyzeRecording(s.samples, { sampleRate: 48000, options });
    expect(offline.strokes.length).toBeGreaterThan(0);
    const live = createLiveAnalyzer({ sampleRate: 48000, options: { ...options, calibrationMs: 2000 } });
    let late = 0;
    const events: LiveEvent[] = [];
    for (let at = 0; at < s.samples.length; at += 128) {
      for (const e of live.push(s.samples.subarray(at, at + 128))) {
        events.push(e);
        if (e.type === "stroke" && (at + 128) / 48000 - e.stroke.endS > 0.005 + 0.02 + 0.005 + 128 / 48000) late++;
      }
      expect(live.lastPushSpectra).toBeLessThanOrEqual(SPECTRA_PER_128_SAMPLES);
    }
    events.push(...live.flush());
    expect(late).toBeGreaterThan(0);
    expect(strokesOf(events)).toEqual(offline.strokes);
    expect(rejectedOf(events)).toEqual(offline.rejected);
  });

  it("flush completes every judgement still waiting, whatever the budget", () => {
    const s = decayingSession(48000, 3, 21);
    const offline = analyzeRecording(s.samples, { sampleRate: 48000, options: { leadInMs: 2000 } });
    // Cut the recording just after the last stroke's sound: it is closed by flush.
    const cut = Math.round((s.strokes[2].endS + 0.01) * 48000);
    const live = createLiveAnalyzer({ sampleRate: 48000 });
    const events: LiveEvent[] = [];
    for (let at = 0; at < cut; at += 128) events.push(...live.push(s.samples.subarray(at, Math.min(cut, at + 128))));
    expect(strokesOf(events)).toHaveLength(2);
    const last = live.flush();
    expect(strokesOf([...last])).toHaveLength(1);
    expect(live.lastPushSpectra).toBeGreaterThan(SPECTRA_PER_128_SAMPLES);
    expect(strokesOf([...events, ...last]).slice(0, 2)).toEqual(offline.strokes.slice(0, 2));
  });
});

describe("chunked analysis of WAV bytes (the command line's path)", () => {
  it.each([
    ["16-bit mono", 1, 16],
    ["24-bit stereo", 2, 24],
  ] as const)("equals decoding whole and analysing offline: %s", (_label, channels, bits) => {
    const s = sessionWithPauses(48000, (p) => [{ kind: "tap", atS: p.strokes[3].endS + 1 }]);
    const chans = Array.from({ length: channels }, () => s.samples);
    const bytes = encodeWav(chans, 48000, { bitsPerSample: bits });
    const whole = analyzeRecording(decodeWavMono(bytes).samples, { sampleRate: 48000 });
    expect(analyzeWavBytes(bytes)).toEqual(whole);
    const withLeadIn = analyzeRecording(decodeWavMono(bytes).samples, { sampleRate: 48000, options: { leadInMs: 2000 } });
    expect(analyzeWavBytes(bytes, { leadInMs: 2000 })).toEqual(withLeadIn);
    expect(whole.strokes).toHaveLength(s.strokes.length);
  });
});
