import { describe, expect, it } from "vitest";
import { SpectrumFrame } from "@/lib/audio/frames";
import { bandPower, spectralCentroidHz, spectralFlatness, spectralFlux, spectralRolloffHz } from "@/lib/audio/features";
import { createRandom } from "@/lib/audio/synth";

const fs = 48000;
const n = 1024;

function tone(freq: number): Float32Array {
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) x[i] = Math.sin((2 * Math.PI * freq * i) / fs);
  return x;
}

function noise(seed: number): Float32Array {
  const r = createRandom(seed);
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) x[i] = 2 * r() - 1;
  return x;
}

describe("meyda extractors on fft.js spectra", () => {
  it("centroid of a pure tone is its frequency within one bin", () => {
    // A pure tone's spectrum is symmetric about its frequency, so its centroid
    // is the frequency itself (meyda docs: spectralCentroid is the spectrum's
    // centre of mass). One bin here is 46.875 Hz.
    const frame = new SpectrumFrame(n);
    for (const f of [440, 1000, 3217, 9000]) {
      frame.analyze(tone(f), 0);
      expect(Math.abs(spectralCentroidHz(frame.amplitude, fs, n) - f)).toBeLessThan(fs / n);
    }
  });

  it("flatness of white noise is far above that of a tone", () => {
    // Rayleigh-distributed amplitudes of white noise give a flatness near 0.85
    // (geometric/arithmetic mean of a Rayleigh variable); a tone is near 0.
    const frame = new SpectrumFrame(n);
    frame.analyze(noise(3), 0);
    const white = spectralFlatness(frame.amplitude.subarray(1));
    frame.analyze(tone(2000), 0);
    const sine = spectralFlatness(frame.amplitude.subarray(1));
    expect(white).toBeGreaterThan(0.7);
    expect(sine).toBeLessThan(0.1);
    expect(white / sine).toBeGreaterThan(10);
  });

  it("silence gives NaN centroid (meyda's documented behaviour), not a number to trust", () => {
    const frame = new SpectrumFrame(n);
    frame.analyze(new Float32Array(n), 0);
    expect(Number.isNaN(spectralCentroidHz(frame.amplitude, fs, n))).toBe(true);
  });

  it("rolloff of a low tone lies near the tone", () => {
    const frame = new SpectrumFrame(n);
    frame.analyze(tone(1000), 0);
    const r = spectralRolloffHz(frame.amplitude, fs);
    expect(r).toBeGreaterThan(900);
    expect(r).toBeLessThan(3000);
  });
});

describe("our own features", () => {
  it("flux counts only rising bins", () => {
    const a = new Float32Array([1, 2, 3, 4]);
    const b = new Float32Array([2, 1, 5, 4]);
    expect(spectralFlux(a, b)).toBe(3);
    expect(spectralFlux(b, a)).toBe(1);
    expect(spectralFlux(a, a)).toBe(0);
  });

  it("band power of a full-scale sine inside the band is its mean square, 0.5", () => {
    // A sine of amplitude 1 has mean square 1/2 (definition of RMS).
    const frame = new SpectrumFrame(n);
    frame.analyze(tone(187.5 * 16), 0); // exactly on bin 64
    expect(bandPower(frame.power, 50, 80)).toBeCloseTo(0.5, 3);
    expect(bandPower(frame.power, 100, 200)).toBeLessThan(1e-6);
  });
});
