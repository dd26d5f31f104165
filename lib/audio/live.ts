// The live analyzer for the bench screen's Worker: push audio blocks of any
// size as they arrive (an AudioWorklet delivers 128 samples at a time), get
// each stroke back as soon as the lift after it is heard. It runs the same
// stages as analyzeRecording, on the same hop grid, so a recording pushed
// through it block by block yields the same strokes.

import { StrokeJudge, type Stroke } from "./analyzer";
import { LevelMeter, noiseFloorDbfs } from "./level";
import { resolveOptions, validateSampleRate, type AnalysisOptions, type AnalysisOptionsInput } from "./options";
import { StrokeSegmenter, type Candidate, type RejectedSound } from "./strokes";

export type LiveState = "calibrating" | "listening";

export type LiveEvent =
  | { type: "calibrated"; noiseFloorDbfs: number; atS: number }
  | { type: "stroke"; stroke: Stroke }
  | { type: "rejected"; sound: RejectedSound };

export interface LiveAnalyzerInput {
  sampleRate: number;
  options?: AnalysisOptionsInput;
  /**
   * A floor already known (e.g. from an earlier calibration), dBFS. Without
   * it the analyzer first calibrates on calibrationMs of room sound.
   */
  noiseFloorDbfs?: number;
}

const NO_EVENTS: readonly LiveEvent[] = Object.freeze([]);

export class LiveAnalyzer {
  readonly sampleRate: number;
  readonly options: AnalysisOptions;
  private readonly meter: LevelMeter;
  private readonly segmenter: StrokeSegmenter;
  private readonly judge: StrokeJudge;
  private readonly hopSize: number;
  private floor: number | null = null;
  private calibrationHops = 0;
  private calibration: Float64Array;
  private calibrationCount = 0;
  private liveState: LiveState = "calibrating";
  // Audio since the earliest sample a stroke may still need; `base` is the
  // absolute index of history[0].
  private history: Float32Array;
  private base = 0;
  private length = 0;
  private readonly maxKeep: number;
  private clipHops: number[] = [];
  private events: LiveEvent[] = [];
  private accepted: Stroke[] = [];

  constructor(input: LiveAnalyzerInput) {
    this.sampleRate = validateSampleRate(input.sampleRate);
    this.options = resolveOptions(input.options ?? {});
    this.meter = LevelMeter.fromOptions(this.sampleRate, this.options);
    this.hopSize = this.meter.hopSize;
    this.segmenter = new StrokeSegmenter(this.options, this.meter.windowHops);
    this.judge = new StrokeJudge(this.sampleRate, this.options);
    const o = this.options;
    const liftHops = Math.ceil(o.minLiftMs / o.hopMs);
    // A stroke is needed whole until its lift has been heard.
    this.maxKeep =
      Math.ceil((this.sampleRate * o.maxStrokeMs) / 1000) + (liftHops + this.meter.windowHops + 2) * this.hopSize;
    this.history = new Float32Array(Math.max(1 << 14, 2 * this.maxKeep));
    this.calibration = new Float64Array(0);
    if (input.noiseFloorDbfs !== undefined) this.setNoiseFloor(input.noiseFloorDbfs);
    else this.startCalibration();
  }

  get state(): LiveState {
    return this.liveState;
  }

  get noiseFloorDbfs(): number | null {
    return this.floor;
  }

  /** Seconds of audio pushed since creation or reset. */
  get timeS(): number {
    return (this.base + this.length) / this.sampleRate;
  }

  /** Strokes accepted since creation or reset, in order. */
  get strokes(): readonly Stroke[] {
    return this.accepted;
  }

  /**
   * (Re)start calibration: the next durationMs of audio is taken as room
   * sound. Strokes are not looked for meanwhile.
   */
  startCalibration(durationMs: number = this.options.calibrationMs): void {
    if (!Number.isFinite(durationMs) || durationMs < 100 || durationMs > 60_000) {
      throw new RangeError(`calibration durationMs must be in [100, 60000], got ${durationMs}`);
    }
    this.calibrationHops = Math.max(1, Math.floor(Math.round((this.sampleRate * durationMs) / 1000) / this.hopSize));
    this.calibration = new Float64Array(this.calibrationHops);
    this.calibrationCount = 0;
    this.liveState = "calibrating";
    this.segmenter.reset();
  }

  setNoiseFloor(dbfs: number): void {
    if (!Number.isFinite(dbfs) || dbfs > 0) throw new RangeError(`noiseFloorDbfs must be a finite level at or below 0 dBFS, got ${dbfs}`);
    this.floor = dbfs;
    this.segmenter.setNoiseFloor(dbfs);
    this.liveState = "listening";
  }

  /** Forget all audio, strokes and the floor; calibrate again on what comes next. */
  reset(): void {
    this.meter.reset();
    this.segmenter.reset();
    this.base = 0;
    this.length = 0;
    this.clipHops = [];
    this.accepted = [];
    this.events = [];
    this.floor = null;
    this.startCalibration();
  }

  /**
   * Analyse the next block (mono, full scale ±1). Returns what completed
   * during it; the same frozen empty array when nothing did.
   */
  push(block: Float32Array): readonly LiveEvent[] {
    if (!(block instanceof Float32Array)) throw new TypeError("push expects a Float32Array block");
    if (block.length === 0) return NO_EVENTS;
    this.append(block);
    this.meter.push(block, 0, block.length, this.onHop);
    return this.drain();
  }

  /** End of input: a stroke still sounding is closed and judged. */
  flush(): readonly LiveEvent[] {
    if (this.liveState === "listening") {
      const c = this.segmenter.finish();
      if (c) this.take(c);
    }
    return this.drain();
  }

  private drain(): readonly LiveEvent[] {
    if (this.events.length === 0) return NO_EVENTS;
    const out = this.events;
    this.events = [];
    return out;
  }

  private readonly onHop = (level: number, clipped: boolean): void => {
    const hop = this.meter.hops - 1;
    if (clipped) this.clipHops.push(hop);
    if (this.liveState === "calibrating") {
      this.calibration[this.calibrationCount++] = level;
      if (this.calibrationCount === this.calibrationHops) {
        const floor = noiseFloorDbfs(this.calibration, this.options);
        this.setNoiseFloor(floor);
        this.events.push({ type: "calibrated", noiseFloorDbfs: floor, atS: ((hop + 1) * this.hopSize) / this.sampleRate });
      }
      return;
    }
    const c = this.segmenter.step(hop, level);
    if (c) this.take(c);
  };

  private take(c: Candidate): void {
    const start = c.startHop * this.hopSize;
    const end = c.endHop * this.hopSize;
    let view: Float32Array | null = null;
    if (!this.judge.durationReason(c) && start >= this.base) {
      view = this.history.subarray(start - this.base, end - this.base);
    }
    let clip = false;
    for (const h of this.clipHops) if (h >= c.startHop && h < c.endHop) clip = true;
    // Clip marks before this stroke's end can no longer belong to any stroke.
    this.clipHops = this.clipHops.filter((h) => h >= c.endHop);
    const j = this.judge.judge(c, view, this.floor ?? this.options.minNoiseFloorDbfs, clip);
    if (j.kind === "stroke") {
      const stroke: Stroke = { index: this.accepted.length + 1, ...j.stroke };
      this.accepted.push(stroke);
      this.events.push({ type: "stroke", stroke });
    } else {
      this.events.push({ type: "rejected", sound: j.sound });
    }
  }

  private append(block: Float32Array): void {
    const n = block.length;
    if (this.length + n > this.history.length) {
      // Keep from the earliest sample an open or future stroke can start at.
      const open = this.segmenter.earliestOpenHop;
      const currentHopStart = this.meter.hops * this.hopSize;
      let keepFrom = open >= 0 ? Math.min(open * this.hopSize, currentHopStart) : currentHopStart;
      const total = this.base + this.length;
      // A burst longer than maxStrokeMs is rejected on its duration alone,
      // so audio older than that may go.
      keepFrom = Math.min(total, Math.max(keepFrom, total - this.maxKeep, this.base));
      const drop = keepFrom - this.base;
      const keepHop = Math.floor(keepFrom / this.hopSize);
      this.clipHops = this.clipHops.filter((h) => h >= keepHop);
      this.history.copyWithin(0, drop, this.length);
      this.base = keepFrom;
      this.length -= drop;
      if (this.length + n > this.history.length) {
        const bigger = new Float32Array(Math.max(2 * this.history.length, this.length + n));
        bigger.set(this.history.subarray(0, this.length));
        this.history = bigger;
      }
    }
    this.history.set(block, this.length);
    this.length += n;
  }
}

export function createLiveAnalyzer(input: LiveAnalyzerInput): LiveAnalyzer {
  return new LiveAnalyzer(input);
}
