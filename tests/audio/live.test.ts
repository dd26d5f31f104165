import { describe, expect, it } from "vitest";
import { analyzeRecording, analyzeWavBytes } from "@/lib/audio/analyzer";
import { decodeWavMono, encodeWav } from "@/lib/audio/wav";
import { createLiveAnalyzer, type LiveAnalyzer, type LiveEvent } from "@/lib/audio/live";
import { createRandom } from "@/lib/audio/synth";
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
    expect(strokesOf(events)).toEqual(offlineLeadIn.strokes);
    expect(rejectedOf(events)).toEqual(offlineLeadIn.rejected);
    expect(live.strokes).toEqual(offlineLeadIn.strokes);
    expect(offlineLeadIn.strokes).toHaveLength(session.strokes.length);
  });

  it("with the floor the offline analyzer estimated from the quietest frames", () => {
    const offline = analyzeRecording(session.samples, { sampleRate: 44100 });
    const live = createLiveAnalyzer({ sampleRate: 44100, noiseFloorDbfs: offline.noiseFloorDbfs });
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
