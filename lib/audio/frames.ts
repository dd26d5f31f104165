// Framing and spectra: frame and hop sizes derived from the sample rate, the
// Hann window, and a reusable fft.js real transform that turns a frame of
// samples into a one-sided power spectrum scaled so that its bins sum to the
// frame's mean-square level.

import FFT from "fft.js";

/** Power of two closest (on a log scale) to the target duration. */
export function frameSizeFor(sampleRateHz: number, frameTargetMs: number): number {
  const target = (sampleRateHz * frameTargetMs) / 1000;
  const exponent = Math.max(4, Math.round(Math.log2(target)));
  return 2 ** exponent;
}

export function hopSizeFor(sampleRateHz: number, hopMs: number): number {
  return Math.max(1, Math.round((sampleRateHz * hopMs) / 1000));
}

/**
 * Periodic Hann window: the DFT-even form, whose overlap-add at half-frame
 * hops is exactly constant, which the period form is not.
 */
export function hannWindow(size: number): Float64Array {
  const w = new Float64Array(size);
  for (let i = 0; i < size; i++) w[i] = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / size);
  return w;
}

/** First and last bin (inclusive) whose centre frequency lies in [lowHz, highHz]. */
export function bandBins(sampleRateHz: number, size: number, lowHz: number, highHz: number): [number, number] {
  const binHz = sampleRateHz / size;
  const first = Math.max(0, Math.ceil(lowHz / binHz - 1e-9));
  const last = Math.min(size / 2, Math.floor(highHz / binHz + 1e-9));
  return [first, last];
}

/**
 * One frame's worth of pre-allocated buffers. `analyze` overwrites them, so a
 * single instance serves every frame of a recording without allocation.
 */
export class SpectrumFrame {
  readonly size: number;
  readonly bins: number;
  readonly window: Float64Array;
  /** |X[k]|, k = 0..size/2, for meyda's extractors (scale-free features); filled only on request. */
  readonly amplitude: Float32Array;
  /**
   * Mean-square contribution of each bin: sum over all bins = mean square of
   * the frame. Only bins firstBin..lastBin of the last analyze() are current.
   */
  readonly power: Float64Array;
  private readonly fft: FFT;
  private readonly input: Float64Array;
  private readonly output: Float64Array;
  private readonly powerScale: number;
  private readonly windowNorm: number;
  /** Mean square of the last frame, Hann-weighted: sum (w x)^2 / sum w^2 (Parseval's full-band total). */
  meanSquare = 0;

  constructor(size: number) {
    if (!Number.isInteger(size) || size < 16 || (size & (size - 1)) !== 0) {
      throw new RangeError(`frame size must be a power of two of at least 16, got ${size}`);
    }
    this.size = size;
    this.bins = size / 2 + 1;
    this.window = hannWindow(size);
    this.fft = new FFT(size);
    this.input = new Float64Array(size);
    this.output = new Float64Array(2 * size);
    this.amplitude = new Float32Array(this.bins);
    this.power = new Float64Array(this.bins);
    let sumW2 = 0;
    for (let i = 0; i < size; i++) sumW2 += this.window[i] * this.window[i];
    // Parseval: sum |X|^2 over all N bins = N * sum (w x)^2; dividing by the
    // window's energy makes the estimate unbiased for a stationary signal.
    this.powerScale = 1 / (size * sumW2);
    this.windowNorm = 1 / sumW2;
  }

  /**
   * Window samples[start .. start+size) and compute its spectrum. Samples
   * past the end of the array count as zeros, so a frame never reads audio
   * outside the view it was given.
   */
  analyze(samples: Float32Array, start: number, withAmplitude = true, firstBin = 0, lastBin = this.size / 2): void {
    const n = this.size;
    const x = this.input;
    const w = this.window;
    const avail = Math.max(0, Math.min(n, samples.length - start));
    let energy = 0;
    for (let i = 0; i < avail; i++) {
      const v = samples[start + i] * w[i];
      x[i] = v;
      energy += v * v;
    }
    for (let i = avail; i < n; i++) x[i] = 0;
    this.meanSquare = energy * this.windowNorm;
    // fft.js fills only bins 0..N/2 of a real transform; that is all we read.
    this.fft.realTransform(this.output, x);
    const out = this.output;
    const amp = this.amplitude;
    const pow = this.power;
    const scale = this.powerScale;
    const half = n / 2;
    // Only the bins asked for: a band power needs a third of them.
    for (let k = firstBin; k <= lastBin; k++) {
      const re = out[2 * k];
      const im = out[2 * k + 1];
      // Interior bins stand for their mirror image too.
      pow[k] = (k === 0 || k === half ? re * re + im * im : 2 * (re * re + im * im)) * scale;
    }
    // Square roots are the costliest part after the transform; band powers
    // do not need them, so they are taken only for shape features.
    if (withAmplitude) {
      for (let k = 0; k <= half; k++) amp[k] = Math.sqrt(out[2 * k] * out[2 * k] + out[2 * k + 1] * out[2 * k + 1]);
    }
  }
}

/**
 * Start positions of frames of `size` at `hop` inside [start, end); a region
 * shorter than one frame gets one frame centred on it.
 */
export function framePositions(start: number, end: number, size: number, hop: number): number[] {
  const out: number[] = [];
  for (let at = start; at + size <= end; at += hop) out.push(at);
  if (out.length === 0) out.push(Math.max(0, Math.floor((start + end - size) / 2)));
  return out;
}

/**
 * Frames no more than `maxHop` apart that cover [start, end) exactly, first
 * frame at start, last ending at end, so neither end of the region is
 * left out.
 */
export function coveringPositions(start: number, end: number, size: number, maxHop: number): number[] {
  const span = end - start - size;
  if (span <= 0) return [Math.max(0, Math.floor((start + end - size) / 2))];
  const count = Math.ceil(span / maxHop) + 1;
  const out: number[] = [];
  for (let i = 0; i < count; i++) out.push(start + Math.round((span * i) / (count - 1)));
  return out;
}
