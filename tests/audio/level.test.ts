import { afterAll, describe, expect, it } from "vitest";
import { writeFileSync } from "node:fs";
import { meanBandPower, meanSquareDb } from "@/lib/audio/contrast";
import { bandBins, SpectrumFrame } from "@/lib/audio/frames";
import { levelSeries, LevelMeter, noiseFloorDbfs, percentile } from "@/lib/audio/level";
import { resolveOptions } from "@/lib/audio/options";
import { createRandom, decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { encodeWav } from "@/lib/audio/wav";
import { readMono, scratchDir, skipWithout, soxRmsDb } from "./helpers";

const scratch = scratchDir();
afterAll(() => scratch.cleanup());
const o = resolveOptions();

describe.skipIf(skipWithout("sox"))("levels against sox stats (Debian sox, `sox FILE -n stats`, RMS lev dB)", () => {
  const session = synthesizeSession({
    sampleRate: 48000,
    seed: 11,
    strokes: decayingContrasts(6, 10, 0.5, 2).map((contrastDb) => ({ contrastDb })),
  });

  for (const bits of [16, 32] as const) {
    it(`whole recording, ${bits}-bit, within 0.1 dB`, () => {
      const path = scratch.path(`level-${bits}.wav`);
      writeFileSync(path, encodeWav([session.samples], 48000, { bitsPerSample: bits }));
      const decoded = readMono(path).samples;
      expect(Math.abs(meanSquareDb(decoded, 0, decoded.length) - soxRmsDb(path))).toBeLessThan(0.1);
    });
  }

  it("each stroke's body, cut out by sox trim, within 0.1 dB", () => {
    const path = scratch.path("level-body.wav");
    writeFileSync(path, encodeWav([session.samples], 48000, { bitsPerSample: 32, encoding: "float" }));
    for (const s of session.strokes) {
      const a = Math.round((s.startS + 0.25 * (s.endS - s.startS)) * 48000);
      const b = Math.round((s.startS + 0.75 * (s.endS - s.startS)) * 48000);
      const ours = meanSquareDb(session.samples, a, b);
      const ref = soxRmsDb(path, ["trim", `${a}s`, `${b - a}s`]);
      expect(Math.abs(ours - ref)).toBeLessThan(0.1);
    }
  });

  it("spectral band power (Hann frames, Parseval scaling) of white noise matches sox's band-passed RMS", () => {
    // sox's `sinc 2000-10000` is a linear-phase FIR band-pass; on white noise
    // its output power is the in-band share of the input, like our bin sum.
    const fs = 48000;
    const rand = createRandom(2);
    const x = new Float32Array(fs * 10);
    for (let i = 0; i < x.length; i++) x[i] = 0.3 * (2 * rand() - 1);
    const path = scratch.path("white.wav");
    writeFileSync(path, encodeWav([x], fs, { bitsPerSample: 32, encoding: "float" }));
    const frame = new SpectrumFrame(1024);
    const [first, last] = bandBins(fs, 1024, 2000, 10000);
    const ours = 10 * Math.log10(meanBandPower(x, 0, x.length, frame, first, last));
    const ref = soxRmsDb(path, ["sinc", "-n", "4096", "2000-10000"]);
    expect(Math.abs(ours - ref)).toBeLessThan(0.1);
    // And the full-band sum of the same frames is the time-domain level (Parseval).
    const full = 10 * Math.log10(meanBandPower(x, 0, x.length, frame, 0, 512));
    expect(Math.abs(full - soxRmsDb(path))).toBeLessThan(0.1);
  });
});

describe.skipIf(skipWithout("sox"))("the level band's high-pass against sox (Debian sox, `highpass -2`, the same cookbook biquad)", () => {
  it("white noise through our level band reads as sox's high-passed RMS, within 0.05 dB", () => {
    const fs = 48000;
    const rand = createRandom(12);
    const x = new Float32Array(fs * 5);
    for (let i = 0; i < x.length; i++) x[i] = 0.3 * (2 * rand() - 1);
    const path = scratch.path("white-hp.wav");
    writeFileSync(path, encodeWav([x], fs, { bitsPerSample: 32, encoding: "float" }));
    const series = levelSeries(x, fs, o);
    const ours = 10 * Math.log10(series.hopPowers.reduce((a, b) => a + b, 0) / series.hopPowers.length);
    const ref = soxRmsDb(path, ["highpass", "-2", String(o.levelBandLowHz)]);
    expect(Math.abs(ours - ref)).toBeLessThan(0.05);
  });
});

describe("the level band's high-pass against the analytic second-order Butterworth response", () => {
  // |H(f)|² = 1 / (1 + (fc/f)^4) (textbook Butterworth magnitude); the
  // bilinear transform's warping is negligible this far below Nyquist.
  it.each([250, 500, 1000, 2000, 4000, 8000])("a %i Hz sine", (f) => {
    const fs = 48000;
    const x = new Float32Array(fs);
    for (let i = 0; i < x.length; i++) x[i] = Math.sin((2 * Math.PI * f * i) / fs);
    const series = levelSeries(x, fs, o);
    // Skip the first tenth of a second while the filter settles.
    const tail = series.hopPowers.subarray(Math.round(0.1 / 0.005));
    const ours = 10 * Math.log10(tail.reduce((a, b) => a + b, 0) / tail.length);
    const expected = 10 * Math.log10(0.5 / (1 + (o.levelBandLowHz / f) ** 4));
    expect(Math.abs(ours - expected)).toBeLessThan(0.1);
  });
});

describe("level envelope", () => {
  it("gives the same hop levels whatever the block size", () => {
    const rand = createRandom(4);
    const x = new Float32Array(20000);
    for (let i = 0; i < x.length; i++) x[i] = 2 * rand() - 1;
    const whole = levelSeries(x, 48000, o).levels;
    const meter = LevelMeter.fromOptions(48000, o);
    const got: number[] = [];
    for (let at = 0; at < x.length; ) {
      const n = 1 + Math.floor(rand() * 300);
      meter.push(x, at, Math.min(x.length, at + n), (l) => got.push(l));
      at += n;
    }
    expect(got).toEqual(Array.from(whole));
  });

  it("zeros give the clamped floor, not -Infinity", () => {
    const s = levelSeries(new Float32Array(48000), 48000, o);
    expect(noiseFloorDbfs(s.levels, o)).toBe(o.minNoiseFloorDbfs);
  });

  it("a constant 0.1 signal reads -20 dBFS (mean square 0.01) with the level band's high-pass off", () => {
    const flat = resolveOptions({ levelBandLowHz: 0 });
    const s = levelSeries(new Float32Array(4800).fill(0.1), 48000, flat);
    expect(noiseFloorDbfs(s.levels, flat)).toBeCloseTo(-20, 6);
    // The high-pass takes a constant out altogether.
    const filtered = levelSeries(new Float32Array(48000).fill(0.1), 48000, o);
    expect(10 * Math.log10(filtered.levels[filtered.levels.length - 1])).toBeLessThan(-100);
  });

  it("percentile by selection equals the sorted value", () => {
    const rand = createRandom(8);
    const v = Float64Array.from({ length: 1001 }, () => rand());
    const sorted = Array.from(v).sort((a, b) => a - b);
    for (const p of [0, 10, 20, 50, 90, 100]) expect(percentile(v, p)).toBe(sorted[Math.round((p / 100) * 1000)]);
  });

  it("flags a clipping run but not a single full-scale sample", () => {
    const x = new Float32Array(4800);
    x[100] = 1;
    expect(levelSeries(x, 48000, o).clipped.some((c) => c === 1)).toBe(false);
    x[2000] = x[2001] = x[2002] = -1;
    expect(levelSeries(x, 48000, o).clipped.some((c) => c === 1)).toBe(true);
  });
});
