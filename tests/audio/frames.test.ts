import { describe, expect, it } from "vitest";
import { bandBins, frameSizeFor, hannWindow, hopSizeFor, SpectrumFrame } from "@/lib/audio/frames";
import { createRandom } from "@/lib/audio/synth";

function naiveDft(x: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = x.length;
  const re = new Float64Array(n / 2 + 1);
  const im = new Float64Array(n / 2 + 1);
  for (let k = 0; k <= n / 2; k++) {
    for (let t = 0; t < n; t++) {
      re[k] += x[t] * Math.cos((2 * Math.PI * k * t) / n);
      im[k] -= x[t] * Math.sin((2 * Math.PI * k * t) / n);
    }
  }
  return { re, im };
}

describe("frame and hop sizes", () => {
  it("chooses the power of two nearest 20 ms at every supported rate", () => {
    // 20 ms is 320, 882, 960, 1920 samples at these rates; nearest powers of
    // two on a log scale are 256, 1024, 1024, 2048.
    expect(frameSizeFor(16000, 20)).toBe(256);
    expect(frameSizeFor(44100, 20)).toBe(1024);
    expect(frameSizeFor(48000, 20)).toBe(1024);
    expect(frameSizeFor(96000, 20)).toBe(2048);
    expect(hopSizeFor(44100, 5)).toBe(221);
  });

  it("bins of the 2–10 kHz band at 48 kHz / 1024 points", () => {
    // bin width 46.875 Hz: 2000/46.875 = 42.67 → first 43; 10000/46.875 = 213.3 → last 213
    expect(bandBins(48000, 1024, 2000, 10000)).toEqual([43, 213]);
  });

  it("periodic Hann windows at half-frame hops add up to a constant", () => {
    // Overlap-add property of the periodic Hann window (Harris, Proc. IEEE 1978).
    const w = hannWindow(64);
    for (let i = 0; i < 32; i++) expect(w[i] + w[i + 32]).toBeCloseTo(1, 12);
  });

  it("rejects a frame size that is not a power of two", () => {
    expect(() => new SpectrumFrame(1000)).toThrow(/1000/);
  });
});

describe("fft.js spectra", () => {
  it("match a naive DFT of the same windowed frame", () => {
    // Reference: the DFT definition X[k] = sum x[t] e^{-2πikt/N}, evaluated directly.
    const n = 256;
    const frame = new SpectrumFrame(n);
    const rand = createRandom(5);
    const x = new Float32Array(n);
    for (let i = 0; i < n; i++) x[i] = 2 * rand() - 1;
    frame.analyze(x, 0);
    const windowed = new Float64Array(n);
    for (let i = 0; i < n; i++) windowed[i] = x[i] * frame.window[i];
    const ref = naiveDft(windowed);
    for (let k = 0; k <= n / 2; k++) {
      expect(frame.amplitude[k]).toBeCloseTo(Math.hypot(ref.re[k], ref.im[k]), 3);
    }
  });

  it("obey Parseval's theorem: the power bins sum to the windowed frame's mean square", () => {
    // Parseval: sum |x w|^2 = (1/N) sum_k |X_k|^2; our bins are scaled by 1/sum(w^2).
    const n = 1024;
    const frame = new SpectrumFrame(n);
    const rand = createRandom(9);
    const x = new Float32Array(n);
    for (let i = 0; i < n; i++) x[i] = 2 * rand() - 1;
    frame.analyze(x, 0);
    let sw2 = 0;
    let swx2 = 0;
    for (let i = 0; i < n; i++) {
      sw2 += frame.window[i] ** 2;
      swx2 += (frame.window[i] * x[i]) ** 2;
    }
    let total = 0;
    for (let k = 0; k < frame.bins; k++) total += frame.power[k];
    expect(total).toBeCloseTo(swx2 / sw2, 6);
  });

  it("treat samples past the end of the view as zeros", () => {
    const frame = new SpectrumFrame(64);
    frame.analyze(new Float32Array(10).fill(1), 0);
    for (const v of frame.power) expect(Number.isFinite(v)).toBe(true);
  });
});
