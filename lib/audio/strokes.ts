// Splitting the level envelope into strokes, and deciding whether a burst of
// sound is lapping at all. Segmentation is a hop-by-hop state machine with
// hysteresis relative to the noise floor, so the live path can run it on
// audio as it arrives and the offline path on a whole recording, identically.

import { bandBins, type SpectrumFrame } from "./frames";
import { spectralFlatness } from "./features";
import type { AnalysisOptions } from "./options";

/** A burst of sound found by the segmenter, in hops; not yet judged. */
export interface Candidate {
  /** First hop of the burst. */
  startHop: number;
  /** Hop just past the burst. */
  endHop: number;
  /**
   * False when the burst was already sounding when listening began (during a
   * calibration, or at the start of a file): its start was never heard.
   */
  startHeard?: boolean;
  /** False when input ended while the burst still sounded: its end (and so its body) was never heard. */
  endHeard?: boolean;
}

export type RejectionReason = "too-short" | "too-long" | "not-noise-like";

export interface RejectedSound {
  startS: number;
  endS: number;
  reason: RejectionReason;
  /** Median spectral flatness over the shape band, when it was measured. */
  flatness: number | null;
}

/**
 * Hysteresis segmenter. Feed it one windowed level per hop; it returns a
 * candidate when a burst has ended (after a lift of minLiftMs), else null.
 */
export class StrokeSegmenter {
  private startLevel = Infinity;
  private endLevel = Infinity;
  private readonly liftHops: number;
  private readonly startAboveFloorDb: number;
  private readonly endAboveFloorDb: number;
  private readonly windowHops: number;
  private active = false;
  private runStart = -1;
  private candidateStart = -1;
  private lastAbove = -1;
  private lastHop = -1;
  // Whether a hop below the exit level has been heard since listening began:
  // until then a burst under way started before we listened.
  private heardQuiet = false;
  private runHeard = true;
  // The open burst's level track (dB) and a rise above it being tested.
  private readonly trackRate: number;
  private readonly riseDb: number;
  private readonly holdHops: number;
  private trackDb = 0;
  private lastLowHop = -1;
  private riseStart = -1;
  private riseFrom = 0;
  private riseHeld = 0;

  constructor(options: AnalysisOptions, windowHops: number) {
    this.liftHops = Math.max(1, Math.ceil(options.minLiftMs / options.hopMs));
    this.windowHops = windowHops;
    this.startAboveFloorDb = options.strokeStartAboveFloorDb;
    this.endAboveFloorDb = options.strokeEndAboveFloorDb;
    this.trackRate = Math.min(1, options.hopMs / options.levelTrackMs);
    this.riseDb = options.splitRiseDb;
    this.holdHops = Math.max(1, Math.round(options.splitHoldMs / options.hopMs));
  }

  setNoiseFloor(floorDbfs: number): void {
    this.startLevel = 10 ** ((floorDbfs + this.startAboveFloorDb) / 10);
    this.endLevel = 10 ** ((floorDbfs + this.endAboveFloorDb) / 10);
  }

  reset(): void {
    this.active = false;
    this.runStart = -1;
    this.candidateStart = -1;
    this.lastAbove = -1;
    this.lastHop = -1;
    this.heardQuiet = false;
    this.runHeard = true;
    this.riseStart = -1;
  }

  /** First hop of the burst in progress, or -1 when none is. */
  get openStartHop(): number {
    return this.active ? this.candidateStart : -1;
  }

  /**
   * While the burst in progress is in a lift (its last step was below the
   * exit level): the end hop it closes with if the lift lasts minLiftMs.
   * -1 otherwise. Lets the live analyzer measure the body before the close.
   */
  get liftEndHop(): number {
    return this.active && this.lastHop > this.lastAbove ? this.endHopNow() : -1;
  }

  /** The earliest hop a pending or future candidate could start at. */
  get earliestOpenHop(): number {
    if (this.active) return this.candidateStart;
    return this.runStart;
  }

  step(hop: number, level: number): Candidate | null {
    this.lastHop = hop;
    if (!this.active) {
      if (!(level >= this.endLevel)) {
        this.runStart = -1;
        this.heardQuiet = true;
        return null;
      }
      // The window trails the audio, so the hop where the level first rose
      // above the exit level is where the sound began.
      if (this.runStart < 0) {
        this.runStart = hop;
        this.runHeard = this.heardQuiet;
      }
      if (level >= this.startLevel) {
        this.active = true;
        this.candidateStart = this.runStart;
        this.lastAbove = hop;
        this.trackDb = 10 * Math.log10(level);
        this.lastLowHop = hop;
        this.riseStart = -1;
      }
      return null;
    }
    const db = 10 * Math.log10(level);
    if (hop - this.candidateStart < this.windowHops + this.holdHops) {
      // The sound is still coming up through the window: follow it.
      if (db > this.trackDb) this.trackDb = db;
      this.lastLowHop = hop;
    } else {
      const split = this.trackRise(hop, db);
      if (split) return split;
      if (this.riseStart < 0) this.trackDb += this.trackRate * (db - this.trackDb);
    }
    const above = level >= this.endLevel;
    if (above) {
      this.lastAbove = hop;
      return null;
    }
    if (hop - this.lastAbove >= this.liftHops) return this.close();
    return null;
  }

  /**
   * A rise of riseDb above the level track that holds for holdHops: the
   * burst so far ends where the rise began (hops before it stayed within
   * 3 dB of the track), and a new one starts there, its start heard.
   */
  private trackRise(hop: number, db: number): Candidate | null {
    if (this.riseStart < 0) {
      if (db < this.trackDb + 3) this.lastLowHop = hop;
      if (db >= this.trackDb + this.riseDb) {
        this.riseStart = Math.max(this.candidateStart + 1, this.lastLowHop + 1);
        this.riseFrom = this.trackDb;
        this.riseHeld = 1;
      }
      return null;
    }
    if (db < this.riseFrom + this.riseDb - 3) {
      // It fell back: a knock or a swell, not a new stroke.
      this.riseStart = -1;
      this.lastLowHop = hop;
      return null;
    }
    if (++this.riseHeld < this.holdHops) return null;
    const c: Candidate = { startHop: this.candidateStart, endHop: this.riseStart, startHeard: this.runHeard };
    this.candidateStart = this.riseStart;
    this.runHeard = true;
    this.trackDb = db;
    this.lastAbove = hop;
    this.lastLowHop = hop;
    this.riseStart = -1;
    return c;
  }

  /** End of input: close a burst still in progress, its end not heard. */
  finish(): Candidate | null {
    return this.active ? { ...this.close(), endHeard: false } : null;
  }

  private endHopNow(): number {
    // The window still held the burst's last hop for windowHops-1 hops after
    // the sound stopped; step back to where it really ended.
    return Math.max(this.candidateStart + 1, this.lastAbove - this.windowHops + 2);
  }

  private close(): Candidate {
    const c = { startHop: this.candidateStart, endHop: this.endHopNow(), startHeard: this.runHeard };
    this.active = false;
    this.runStart = -1;
    this.candidateStart = -1;
    this.lastAbove = -1;
    this.heardQuiet = true;
    this.riseStart = -1;
    return c;
  }
}

/**
 * Median spectral flatness over the shape band, from `frames` evenly spaced
 * frames across [start, end) of `samples` (indices relative to the array).
 */
export function medianFlatness(
  samples: Float32Array,
  start: number,
  end: number,
  frame: SpectrumFrame,
  sampleRateHz: number,
  options: AnalysisOptions,
): number {
  const n = frame.size;
  const cap = sampleRateHz * options.highBandMaxFractionOfRate;
  const [first, last] = bandBins(sampleRateHz, n, options.shapeBandLowHz, Math.min(options.shapeBandHighHz, cap));
  const span = end - start - n;
  const count = span <= 0 ? 1 : options.shapeFramesPerStroke;
  const values: number[] = [];
  for (let i = 0; i < count; i++) {
    const at = span <= 0 ? Math.max(0, start + Math.floor(span / 2)) : start + Math.floor((span * (i + 0.5)) / count);
    frame.analyze(samples, at);
    const f = spectralFlatness(frame.amplitude.subarray(first, last + 1));
    if (Number.isFinite(f)) values.push(f);
  }
  if (values.length === 0) return 0;
  values.sort((a, b) => a - b);
  const mid = values.length >> 1;
  return values.length % 2 ? values[mid] : (values[mid - 1] + values[mid]) / 2;
}
