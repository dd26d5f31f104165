// The level envelope and the noise floor. Every sample passes through here,
// so this is the only per-sample loop of the engine: mean-square level per
// hop, a sliding window over hops, and clipping runs. Spectra are computed
// later, only where a stroke turned up.

import type { AnalysisOptions } from "./options";

export interface LevelSeries {
  /** Windowed mean-square level at each hop (linear, full scale = 1). */
  levels: Float64Array;
  /** 1 where a clipping run began inside the hop. */
  clipped: Uint8Array;
  hopSize: number;
  windowHops: number;
}

/**
 * Incremental meter: push samples in blocks of any size; it calls `onHop`
 * once per completed hop. Offline and live analysis both run this exact code,
 * which is what makes their envelopes, and therefore their strokes, identical.
 */
export class LevelMeter {
  readonly hopSize: number;
  readonly windowHops: number;
  private readonly clipLevel: number;
  private readonly clipRunSamples: number;
  private readonly ring: Float64Array;
  private ringPos = 0;
  private filled = 0;
  private readonly lanes = new Float64Array(4);
  private count = 0;
  private clipRun = 0;
  private hopClipped = 0;
  /** Hops completed so far. */
  hops = 0;

  constructor(hopSize: number, windowHops: number, clipLevel: number, clipRunSamples: number) {
    this.hopSize = hopSize;
    this.windowHops = windowHops;
    this.clipLevel = clipLevel;
    this.clipRunSamples = clipRunSamples;
    this.ring = new Float64Array(windowHops);
  }

  static fromOptions(sampleRateHz: number, options: AnalysisOptions): LevelMeter {
    const hopSize = Math.max(1, Math.round((sampleRateHz * options.hopMs) / 1000));
    const windowHops = Math.max(1, Math.round(options.levelWindowMs / options.hopMs));
    return new LevelMeter(hopSize, windowHops, options.clipLevel, options.clipRunSamples);
  }

  reset(): void {
    this.ring.fill(0);
    this.ringPos = 0;
    this.filled = 0;
    this.lanes.fill(0);
    this.count = 0;
    this.clipRun = 0;
    this.hopClipped = 0;
    this.hops = 0;
  }

  push(block: Float32Array, from: number, to: number, onHop: (level: number, clipped: boolean) => void): void {
    const hop = this.hopSize;
    const lanes = this.lanes;
    // A sample at or beyond the clip level adds at least clipLevel² to its
    // piece's sum of squares, so a piece below that holds none and needs no
    // per-sample clipping test — which would cost more than the sum itself.
    const clipSquare = this.clipLevel * this.clipLevel;
    let i = from;
    while (i < to) {
      const take = Math.min(hop - this.count, to - i);
      const end = i + take;
      const before = lanes[0] + lanes[1] + lanes[2] + lanes[3];
      const pieceStart = i;
      // Four partial sums, each sample going to the lane of its position in
      // the hop: the same additions in the same order however the audio is
      // split into blocks, so live and offline levels agree to the bit.
      let pos = this.count;
      for (; i < end && (pos & 3) !== 0; i++, pos++) lanes[pos & 3] += block[i] * block[i];
      let s0 = lanes[0];
      let s1 = lanes[1];
      let s2 = lanes[2];
      let s3 = lanes[3];
      for (; i + 3 < end; i += 4, pos += 4) {
        const a = block[i];
        const b = block[i + 1];
        const c = block[i + 2];
        const d = block[i + 3];
        s0 += a * a;
        s1 += b * b;
        s2 += c * c;
        s3 += d * d;
      }
      lanes[0] = s0;
      lanes[1] = s1;
      lanes[2] = s2;
      lanes[3] = s3;
      for (; i < end; i++, pos++) lanes[pos & 3] += block[i] * block[i];
      if (lanes[0] + lanes[1] + lanes[2] + lanes[3] - before >= 0.5 * clipSquare) this.scanClipping(block, pieceStart, end);
      else this.clipRun = 0;
      this.count += take;
      if (this.count === hop) {
        const power = (lanes[0] + lanes[1] + (lanes[2] + lanes[3])) / hop;
        lanes.fill(0);
        this.count = 0;
        const level = this.windowed(power);
        const clipped = this.hopClipped === 1;
        this.hopClipped = 0;
        this.hops++;
        onHop(level, clipped);
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
  let h = 0;
  meter.push(samples, 0, n * meter.hopSize, (level, clip) => {
    levels[h] = level;
    clipped[h] = clip ? 1 : 0;
    h++;
  });
  return { levels, clipped, hopSize: meter.hopSize, windowHops: meter.windowHops };
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
