// The level envelope and the noise floor. Every sample passes through here,
// so this is the only per-sample loop of the engine: a high-pass into the
// level band, mean-square level per hop, a sliding window over hops, and
// clipping runs on the raw samples. Spectra are computed
// later, only where a stroke turned up.

import type { AnalysisOptions } from "./options";

export interface LevelSeries {
  /** Windowed mean-square level of the level band at each hop (linear, full scale = 1). */
  levels: Float64Array;
  /** Each hop's own mean-square level of the level band, unwindowed. */
  hopPowers: Float64Array;
  /** Each hop's kurtosis in the level band (3 for Gaussian noise; knocks and clicks raise it). */
  hopKurtosis: Float64Array;
  /** 1 where a clipping run began inside the hop. */
  clipped: Uint8Array;
  hopSize: number;
  windowHops: number;
}

/**
 * Coefficients of a second-order Butterworth high-pass (the biquad of R.
 * Bristow-Johnson's Audio EQ Cookbook with Q = 1/√2), normalised so a0 = 1.
 */
export interface Biquad {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

/**
 * Second-order Butterworth sections (R. Bristow-Johnson's Audio EQ Cookbook,
 * Q = 1/√2): the high- and low-pass share their poles; their zeros differ.
 */
function butterworth(kind: "high" | "low", cutoffHz: number, sampleRateHz: number): Biquad {
  if (!(cutoffHz > 0 && cutoffHz < sampleRateHz / 2)) {
    throw new RangeError(`${kind}-pass cutoff must lie between 0 and ${sampleRateHz / 2} Hz, got ${cutoffHz}`);
  }
  const w0 = (2 * Math.PI * cutoffHz) / sampleRateHz;
  const cos = Math.cos(w0);
  const alpha = Math.sin(w0) / (2 * Math.SQRT1_2);
  const a0 = 1 + alpha;
  const edge = kind === "high" ? (1 + cos) / 2 / a0 : (1 - cos) / 2 / a0;
  return { b0: edge, b1: kind === "high" ? -2 * edge : 2 * edge, b2: edge, a1: (-2 * cos) / a0, a2: (1 - alpha) / a0 };
}

export const butterworthHighPass = (cutoffHz: number, sampleRateHz: number) => butterworth("high", cutoffHz, sampleRateHz);
export const butterworthLowPass = (cutoffHz: number, sampleRateHz: number) => butterworth("low", cutoffHz, sampleRateHz);

/** Run a biquad over samples in place (direct form I, from rest). */
export function filterInPlace(samples: Float32Array | Float64Array, f: Biquad): void {
  let x1 = 0;
  let x2 = 0;
  let y1 = 0;
  let y2 = 0;
  for (let i = 0; i < samples.length; i++) {
    const x = samples[i];
    const y = f.b0 * x + f.b1 * x1 + f.b2 * x2 - f.a1 * y1 - f.a2 * y2;
    x2 = x1;
    x1 = x;
    y2 = y1;
    y1 = y;
    samples[i] = y;
  }
}

/** The level band's high-pass at this rate, or null for none (capped below Nyquist like the grind band). */
export function levelBandFilter(sampleRateHz: number, options: AnalysisOptions): Biquad | null {
  if (options.levelBandLowHz <= 0) return null;
  return butterworthHighPass(Math.min(options.levelBandLowHz, sampleRateHz * options.highBandMaxFractionOfRate), sampleRateHz);
}

/**
 * Incremental meter: push samples in blocks of any size; it calls `onHop`
 * once per completed hop with the windowed level, whether a clipping run
 * began in the hop, and the hop's own (unwindowed) power. Levels are of the
 * level band (the high-passed signal); clipping is judged on the raw samples.
 * Offline and live analysis both run this exact code, one sample after the
 * other whatever the block sizes, which is what makes their envelopes, and
 * therefore their strokes, identical.
 */
export class LevelMeter {
  readonly hopSize: number;
  readonly windowHops: number;
  private readonly clipLevel: number;
  private readonly clipRunSamples: number;
  private readonly filter: Biquad | null;
  private readonly ring: Float64Array;
  private ringPos = 0;
  private filled = 0;
  private sum = 0;
  private sum4 = 0;
  private x1 = 0;
  private x2 = 0;
  private y1 = 0;
  private y2 = 0;
  private count = 0;
  private clipRun = 0;
  private hopClipped = 0;
  /** Hops completed so far. */
  hops = 0;

  constructor(hopSize: number, windowHops: number, clipLevel: number, clipRunSamples: number, filter: Biquad | null = null) {
    this.hopSize = hopSize;
    this.windowHops = windowHops;
    this.clipLevel = clipLevel;
    this.clipRunSamples = clipRunSamples;
    this.filter = filter;
    this.ring = new Float64Array(windowHops);
  }

  static fromOptions(sampleRateHz: number, options: AnalysisOptions): LevelMeter {
    const hopSize = Math.max(1, Math.round((sampleRateHz * options.hopMs) / 1000));
    const windowHops = Math.max(1, Math.round(options.levelWindowMs / options.hopMs));
    return new LevelMeter(hopSize, windowHops, options.clipLevel, options.clipRunSamples, levelBandFilter(sampleRateHz, options));
  }

  reset(): void {
    this.ring.fill(0);
    this.ringPos = 0;
    this.filled = 0;
    this.sum = 0;
    this.sum4 = 0;
    this.x1 = this.x2 = this.y1 = this.y2 = 0;
    this.count = 0;
    this.clipRun = 0;
    this.hopClipped = 0;
    this.hops = 0;
  }

  push(
    block: Float32Array,
    from: number,
    to: number,
    onHop: (level: number, clipped: boolean, hopPower: number, hopKurtosis: number) => void,
  ): void {
    const hop = this.hopSize;
    // A sample at or beyond the clip level adds at least clipLevel² to its
    // piece's raw sum of squares, so a piece below that holds none and needs
    // no per-sample clipping test.
    const clipSquare = this.clipLevel * this.clipLevel;
    const f = this.filter;
    let i = from;
    while (i < to) {
      const take = Math.min(hop - this.count, to - i);
      const end = i + take;
      const pieceStart = i;
      let raw = 0;
      let sum = this.sum;
      let sum4 = this.sum4;
      if (f) {
        // A high-pass biquad has b1 = -2·b0 and b2 = b0: three products a sample.
        const { b0, a1, a2 } = f;
        let x1 = this.x1;
        let x2 = this.x2;
        let y1 = this.y1;
        let y2 = this.y2;
        for (; i < end; i++) {
          const x = block[i];
          raw += x * x;
          const y = b0 * (x - 2 * x1 + x2) - a1 * y1 - a2 * y2;
          x2 = x1;
          x1 = x;
          y2 = y1;
          y1 = y;
          const yy = y * y;
          sum += yy;
          sum4 += yy * yy;
        }
        this.x1 = x1;
        this.x2 = x2;
        this.y1 = y1;
        this.y2 = y2;
      } else {
        for (; i < end; i++) {
          const xx = block[i] * block[i];
          raw += xx;
          sum4 += xx * xx;
        }
        sum += raw;
      }
      this.sum = sum;
      this.sum4 = sum4;
      if (raw >= 0.5 * clipSquare) this.scanClipping(block, pieceStart, end);
      else this.clipRun = 0;
      this.count += take;
      if (this.count === hop) {
        const power = this.sum / hop;
        const kurtosis = this.sum > 0 ? (hop * this.sum4) / (this.sum * this.sum) : 0;
        this.sum = 0;
        this.sum4 = 0;
        this.count = 0;
        const level = this.windowed(power);
        const clipped = this.hopClipped === 1;
        this.hopClipped = 0;
        this.hops++;
        onHop(level, clipped, power, kurtosis);
      }
    }
  }

  private scanClipping(block: Float32Array, from: number, to: number): void {
    const c = this.clipLevel;
    let run = this.clipRun;
    for (let i = from; i < to; i++) {
      const x = block[i];
      if (x >= c || x <= -c) {
        // Count the run once, as it reaches its length.
        if (++run === this.clipRunSamples) this.hopClipped = 1;
      } else run = 0;
    }
    this.clipRun = run;
  }

  private windowed(power: number): number {
    const ring = this.ring;
    ring[this.ringPos] = power;
    this.ringPos = (this.ringPos + 1) % ring.length;
    if (this.filled < ring.length) this.filled++;
    // Re-sum rather than add-and-subtract: the window is a handful of hops and
    // a running difference would drift in floating point over hours.
    let s = 0;
    for (let k = 0; k < ring.length; k++) s += ring[k];
    return s / this.filled;
  }
}

/** Envelope of a whole recording in one pass. */
export function levelSeries(samples: Float32Array, sampleRateHz: number, options: AnalysisOptions): LevelSeries {
  const meter = LevelMeter.fromOptions(sampleRateHz, options);
  const n = Math.floor(samples.length / meter.hopSize);
  const levels = new Float64Array(n);
  const clipped = new Uint8Array(n);
  const hopPowers = new Float64Array(n);
  const hopKurtosis = new Float64Array(n);
  let h = 0;
  meter.push(samples, 0, n * meter.hopSize, (level, clip, power, kurtosis) => {
    levels[h] = level;
    clipped[h] = clip ? 1 : 0;
    hopPowers[h] = power;
    hopKurtosis[h] = kurtosis;
    h++;
  });
  return { levels, hopPowers, hopKurtosis, clipped, hopSize: meter.hopSize, windowHops: meter.windowHops };
}

/** The p-th percentile (0–100) of values[from..to), by selection, not a full sort. */
export function percentile(values: Float64Array, p: number, from = 0, to = values.length): number {
  const n = to - from;
  if (n <= 0) return NaN;
  const a = values.slice(from, to);
  const k = Math.min(n - 1, Math.max(0, Math.round((p / 100) * (n - 1))));
  let lo = 0;
  let hi = n - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else break;
  }
  return a[k];
}

/** Noise floor in dBFS from the quiet part of a level series, clamped to stay finite. */
export function noiseFloorDbfs(levels: Float64Array, options: AnalysisOptions, from = 0, to = levels.length): number {
  const p = percentile(levels, options.noiseFloorPercentile, from, to);
  const db = 10 * Math.log10(p);
  return Number.isFinite(db) ? Math.max(db, options.minNoiseFloorDbfs) : options.minNoiseFloorDbfs;
}
