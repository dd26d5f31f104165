// The live analyzer for the bench screen's Worker: push audio blocks of any
// size as they arrive (an AudioWorklet delivers 128 samples at a time), get
// each stroke back as soon as the lift after it is heard. It runs the same
// stages as analyzeRecording, on the same hop grid, so a recording pushed
// through it block by block yields the same strokes.
//
// Spectra are the costly part. Rather than computing all of a stroke's
// frames in the one block where its lift is heard, the analyzer measures them
// while the stroke is still sounding: onset-window frames as soon as their
// audio has arrived, body frames during the lift (the body is the middle half,
// known once the sound has stopped; a lift that turns out to be a reversal
// only costs the frames already measured). Each push may compute at most
// SPECTRA_PER_128_SAMPLES spectra per 128 samples it brings (at least that many),
// so no block costs more than a bounded amount of transform work; a
// judgement still missing frames at the close waits for later pushes.

import { givenFloors, StrokeJudge, type Judgement, type Stroke, type StrokeHops } from "./analyzer";
import {
  combineStroke,
  measureFrame,
  onsetPositions,
  planStroke,
  shapeFrames,
  strokeBands,
  type FrameMeasure,
  type StrokeBands,
  type StrokePlan,
} from "./contrast";
import { bandFloors, calibrationDisturbed, floorGrid, isQuietFrame, measureFloorFrame, type FloorFrame, type NoiseFloors } from "./floors";
import { LevelMeter, noiseFloorDbfs } from "./level";
import { resolveOptions, validateSampleRate, type AnalysisOptions, type AnalysisOptionsInput } from "./options";
import { StrokeSegmenter, type Candidate, type RejectedSound } from "./strokes";

export type LiveState = "calibrating" | "listening";

export type LiveEvent =
  /** The analyzer measures the room again by itself: it turned out quieter than measured. */
  | { type: "remeasuring"; atS: number }
  | {
      type: "calibrated";
      /** Level-band floor, dBFS. */
      noiseFloorDbfs: number;
      noiseFloors: NoiseFloors;
      /** Something sounded during the calibration: the floors come from its quiet part only. */
      disturbed: boolean;
      atS: number;
    }
  | { type: "stroke"; stroke: Stroke }
  | { type: "rejected"; sound: RejectedSound };

export interface LiveAnalyzerInput {
  sampleRate: number;
  options?: AnalysisOptionsInput;
  /**
   * Floors already known (e.g. from an earlier calibration); a number is the
   * level floor alone (see analyzeRecording). Without them the analyzer
   * first calibrates on calibrationMs of room sound.
   */
  noiseFloorDbfs?: number | NoiseFloors;
}

const NO_EVENTS: readonly LiveEvent[] = Object.freeze([]);

/**
 * Spectra one push may compute per 128 samples it brings; a push of fewer
 * samples may still compute this many. One 1024-point spectrum with its
 * flatness costs some 15 µs, a 128-sample block lasts 2.7 ms at 48 kHz; at
 * this rate a stroke's 16 body frames take 8 blocks, well inside a 100 ms lift.
 */
export const SPECTRA_PER_128_SAMPLES = 2;

/** A closed burst whose judgement may still be waiting for frames. */
interface PendingJudgement {
  candidate: Candidate;
  clipped: boolean;
  /** Level-band power and kurtosis of each of its hops. */
  hops: StrokeHops;
  /** Absolute sample range of the burst. */
  start: number;
  end: number;
  /** Null when it is judged on its duration alone. */
  plan: StrokePlan | null;
  /** Measures of plan.at, null until computed. */
  frames: (FrameMeasure | null)[];
  /** Frames before this index are all measured. */
  next: number;
}

/** The burst still sounding and the frames measured on it so far. */
interface OpenStroke {
  startHop: number;
  /** Absolute index of its first sample. */
  start: number;
  /**
   * By start relative to the stroke. Each lies wholly in audio already heard,
   * so it is the frame offline analysis computes at that position whenever
   * it ends no later than the stroke.
   */
  measured: Map<number, FrameMeasure>;
  /** Next of the onset frames (for a stroke at least as long as the window) to measure. */
  onsetNext: number;
  /** The end the current lift would give, its length and frames. */
  liftEndHop: number;
  liftLength: number;
  liftPlan: StrokePlan | null;
  liftNext: number;
}

export class LiveAnalyzer {
  readonly sampleRate: number;
  readonly options: AnalysisOptions;
  private readonly meter: LevelMeter;
  private readonly segmenter: StrokeSegmenter;
  private readonly judge: StrokeJudge;
  private readonly hopSize: number;
  private floors: NoiseFloors | null = null;
  private calibrationHops = 0;
  private calibration: Float64Array;
  private calibrationCount = 0;
  /** Absolute sample where the calibration began, its band-floor frames and how many are measured. */
  private calibrationStart = 0;
  private calibrationFrames: number[] = [];
  private calibrationMeasured: FloorFrame[] = [];
  /** Set when the calibration's hops are all in: its level floor, waiting for the band floors. */
  private calibrationLevel: { levelDbfs: number; disturbed: boolean; atS: number } | null = null;
  private disturbed = false;
  // Whether the floors came from this analyzer's own calibration (only then is
  // a level far below them a sign the calibration heard a stroke), and how
  // many hops in a row have been that far below.
  private selfCalibrated = false;
  private belowFloorHops = 0;
  private readonly dropHops: number;
  // Level-band power of every hop since hopBase, for the knock test and the
  // calibration's quiet frames; trimmed with the audio.
  private hopPowers: Float64Array = new Float64Array(1 << 12);
  private hopKurtosis: Float64Array = new Float64Array(1 << 12);
  private hopBase = 0;
  private hopCount = 0;
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
  private readonly bands: StrokeBands;
  private readonly frameSize: number;
  /** Onset frames of any stroke at least onsetWindowMs long: known from its start. */
  private readonly onsetAt: number[];
  /**
   * Which of them give a flatness when the body has all maxBodyFrames frames
   * (any stroke longer than about 2 × maxBodyFrames frames); a shorter
   * stroke's lift, or its close, measures the few others it needs.
   */
  private readonly onsetShape: boolean[];
  private open: OpenStroke | null = null;
  private pending: PendingJudgement[] = [];
  private credit = 0;
  private spectraTotal = 0;
  private spectraThisCall = 0;

  constructor(input: LiveAnalyzerInput) {
    this.sampleRate = validateSampleRate(input.sampleRate);
    this.options = resolveOptions(input.options ?? {});
    this.meter = LevelMeter.fromOptions(this.sampleRate, this.options);
    this.hopSize = this.meter.hopSize;
    this.segmenter = new StrokeSegmenter(this.options, this.meter.windowHops);
    this.judge = new StrokeJudge(this.sampleRate, this.options);
    const o = this.options;
    this.frameSize = this.judge.frame.size;
    this.bands = strokeBands(this.sampleRate, this.frameSize, o);
    this.onsetAt = onsetPositions(0, Infinity, this.frameSize, this.sampleRate, o);
    this.onsetShape = shapeFrames(this.onsetAt.length + o.maxBodyFrames, o).slice(0, this.onsetAt.length);
    this.dropHops = Math.max(1, Math.round(o.floorDropMs / o.hopMs));
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

  /** Level-band floor, dBFS; null while calibrating. */
  get noiseFloorDbfs(): number | null {
    return this.floors ? this.floors.levelDbfs : this.calibrationLevel ? this.calibrationLevel.levelDbfs : null;
  }

  /** Floors per band; null until a calibration has finished. */
  get noiseFloors(): NoiseFloors | null {
    return this.floors;
  }

  /** Whether the last calibration heard a sound. */
  get calibrationDisturbed(): boolean {
    return this.disturbed;
  }

  /** Seconds of audio pushed since creation or reset. */
  get timeS(): number {
    return (this.base + this.length) / this.sampleRate;
  }

  /** Strokes accepted since creation or reset, in order. */
  get strokes(): readonly Stroke[] {
    return this.accepted;
  }

  /** Spectra computed since creation. */
  get spectraComputed(): number {
    return this.spectraTotal;
  }

  /** Spectra computed by the last push or flush: at most max(SPECTRA_PER_128_SAMPLES, its samples × SPECTRA_PER_128_SAMPLES / 128) for a push. */
  get lastPushSpectra(): number {
    return this.spectraThisCall;
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
    this.calibrationStart = this.meter.hops * this.hopSize;
    this.calibrationFrames = floorGrid(this.calibrationStart, this.calibrationStart + this.calibrationHops * this.hopSize, this.frameSize);
    this.calibrationMeasured = [];
    this.calibrationLevel = null;
    this.liveState = "calibrating";
    this.segmenter.reset();
  }

  /** Use known floors (a number: the level floor alone) and listen at once. */
  setNoiseFloor(floors: number | NoiseFloors): void {
    if (typeof floors === "number" && (!Number.isFinite(floors) || floors > 0)) {
      throw new RangeError(`noiseFloorDbfs must be a finite level at or below 0 dBFS, got ${floors}`);
    }
    this.floors = givenFloors(floors, this.options);
    this.selfCalibrated = false;
    this.calibrationLevel = null;
    this.calibrationFrames = [];
    this.segmenter.setNoiseFloor(this.floors.levelDbfs);
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
    this.open = null;
    this.pending = [];
    this.credit = 0;
    this.floors = null;
    this.disturbed = false;
    this.hopBase = 0;
    this.hopCount = 0;
    this.judge.reset();
    this.startCalibration();
  }

  /**
   * Analyse the next block (mono, full scale ±1). Returns what completed
   * during it; the same frozen empty array when nothing did.
   */
  push(block: Float32Array): readonly LiveEvent[] {
    if (!(block instanceof Float32Array)) throw new TypeError("push expects a Float32Array block");
    if (block.length === 0) return NO_EVENTS;
    this.spectraThisCall = 0;
    this.append(block);
    this.meter.push(block, 0, block.length, this.onHop);
    // Unused credit carries over only up to one push's worth, so quiet time
    // cannot save up for a costly block later.
    const earned = (block.length * SPECTRA_PER_128_SAMPLES) / 128;
    this.credit = Math.min(this.credit + earned, Math.max(SPECTRA_PER_128_SAMPLES, earned));
    this.credit -= this.work(Math.floor(this.credit));
    return this.drain();
  }

  /** End of input: a stroke still sounding is closed, and every stroke waiting for frames is judged. */
  flush(): readonly LiveEvent[] {
    this.spectraThisCall = 0;
    if (this.liveState === "listening") {
      const c = this.segmenter.finish();
      if (c) this.take(c);
    }
    this.work(Infinity);
    return this.drain();
  }

  private drain(): readonly LiveEvent[] {
    if (this.events.length === 0) return NO_EVENTS;
    const out = this.events;
    this.events = [];
    return out;
  }

  private readonly onHop = (level: number, clipped: boolean, power: number, kurtosis: number): void => {
    const hop = this.meter.hops - 1;
    if (clipped) this.clipHops.push(hop);
    this.keepHop(power, kurtosis);
    if (this.liveState === "calibrating") {
      this.calibration[this.calibrationCount++] = level;
      if (this.calibrationCount === this.calibrationHops) {
        // The level floor is known now, so strokes are looked for from the
        // next hop on; the band floors follow in work(), before any stroke
        // is judged, once the calibration's last frames are measured.
        const levelDbfs = noiseFloorDbfs(this.calibration, this.options);
        const disturbed = calibrationDisturbed(this.calibration, 0, this.calibrationHops, levelDbfs, this.options);
        this.calibrationLevel = { levelDbfs, disturbed, atS: ((hop + 1) * this.hopSize) / this.sampleRate };
        this.segmenter.setNoiseFloor(levelDbfs);
        this.liveState = "listening";
        this.selfCalibrated = true;
        this.belowFloorHops = 0;
      }
      return;
    }
    if (this.selfCalibrated && this.segmenter.openStartHop < 0) {
      const floor = this.floors?.levelDbfs ?? this.calibrationLevel?.levelDbfs ?? 0;
      const limit = floor - this.options.floorDropDb;
      // Below the lowest floor there is nothing quieter to measure (digital silence).
      this.belowFloorHops = limit > this.options.minNoiseFloorDbfs && 10 * Math.log10(level) <= limit ? this.belowFloorHops + 1 : 0;
      if (this.belowFloorHops >= this.dropHops) {
        this.events.push({ type: "remeasuring", atS: ((hop + 1) * this.hopSize) / this.sampleRate });
        this.startCalibration();
        return;
      }
    } else this.belowFloorHops = 0;
    const c = this.segmenter.step(hop, level);
    if (c) this.take(c);
  };

  private take(c: Candidate): void {
    const start = c.startHop * this.hopSize;
    const end = c.endHop * this.hopSize;
    let clip = false;
    for (const h of this.clipHops) if (h >= c.startHop && h < c.endHop) clip = true;
    // Clip marks before this stroke's end can no longer belong to any stroke.
    this.clipHops = this.clipHops.filter((h) => h >= c.endHop);
    let plan: StrokePlan | null = null;
    let frames: (FrameMeasure | null)[] = [];
    if (!this.judge.durationReason(c) && start >= this.base) {
      const length = end - start;
      const n = this.frameSize;
      plan = planStroke(0, length, n, this.sampleRate, this.options);
      const measured = this.open && this.open.startHop === c.startHop ? this.open.measured : null;
      const shape = plan.shape;
      // A frame measured while the stroke sounded counts only if it lies
      // inside the stroke as it finally ended, and has a flatness if needed.
      frames = plan.at.map((at, i) => {
        const m = measured && at + n <= length ? measured.get(at) : undefined;
        return m && (m.flatness !== null || !shape[i]) ? m : null;
      });
    }
    this.open = null;
    this.pending.push({
      candidate: c,
      clipped: clip,
      hops: {
        powers: this.hopPowers.slice(c.startHop - this.hopBase, c.endHop - this.hopBase),
        kurtosis: this.hopKurtosis.slice(c.startHop - this.hopBase, c.endHop - this.hopBase),
      },
      start,
      end,
      plan,
      frames,
      next: 0,
    });
  }

  /**
   * Spend up to `budget` spectra: first on the frames closed strokes still
   * miss, reporting each once complete (in order), then on the stroke still
   * sounding. Returns the number computed.
   */
  private work(budget: number): number {
    let spent = this.measureCalibration(budget);
    if (this.calibrationLevel && this.calibrationMeasured.length < this.calibrationFrames.length) {
      // The calibration is over: its last frame or two are measured now, whatever the budget.
      spent += this.measureCalibration(Infinity);
    }
    if (this.calibrationLevel) this.finishCalibration();
    while (this.pending.length > 0) {
      const p = this.pending[0];
      if (p.plan) {
        const plan = p.plan;
        const view = this.history.subarray(p.start - this.base, p.end - this.base);
        for (; p.next < plan.at.length; p.next++) {
          if (p.frames[p.next] !== null) continue;
          if (spent >= budget) return spent;
          p.frames[p.next] = this.measure(view, plan.at[p.next], plan.shape[p.next]);
          spent++;
        }
      }
      this.pending.shift();
      this.report(p);
    }
    if (spent < budget) spent += this.measureOpen(budget - spent);
    return spent;
  }

  private report(p: PendingJudgement): void {
    let j: Judgement;
    if (p.plan) {
      // work() has filled every frame before reporting.
      j = this.judge.judgeMeasured(p.candidate, combineStroke(p.plan, p.frames as FrameMeasure[]), this.currentFloors(), p.clipped, p.hops);
    } else {
      j = this.judge.judge(p.candidate, null, this.currentFloors(), p.clipped, p.hops);
    }
    if (j.kind === "stroke") {
      const stroke: Stroke = { index: this.accepted.length + 1, ...j.stroke };
      this.accepted.push(stroke);
      this.events.push({ type: "stroke", stroke });
    } else {
      this.events.push({ type: "rejected", sound: j.sound });
    }
  }

  private currentFloors(): NoiseFloors {
    const low = this.options.minNoiseFloorDbfs;
    return this.floors ?? { levelDbfs: low, grindDbfs: low, voiceDbfs: low };
  }

  /** Measure the calibration's band-floor frames whose audio has arrived, up to `budget`. */
  private measureCalibration(budget: number): number {
    let spent = 0;
    const end = this.base + this.length;
    while (spent < budget && this.calibrationMeasured.length < this.calibrationFrames.length) {
      const at = this.calibrationFrames[this.calibrationMeasured.length];
      if (at + this.frameSize > end) break;
      this.spectraTotal++;
      this.spectraThisCall++;
      this.calibrationMeasured.push(measureFloorFrame(this.history, at - this.base, at, this.judge.frame, this.bands));
      spent++;
    }
    return spent;
  }

  private finishCalibration(): void {
    const cal = this.calibrationLevel;
    if (!cal) return;
    const o = this.options;
    const quiet = this.calibrationMeasured.map((f) =>
      isQuietFrame(f.at, this.frameSize, this.hopSize, this.hopPowers.subarray(0, this.hopCount), this.hopBase, cal.levelDbfs, o),
    );
    this.floors = bandFloors(cal.levelDbfs, this.calibrationMeasured, quiet, o);
    this.disturbed = cal.disturbed;
    this.calibrationLevel = null;
    this.calibrationFrames = [];
    this.calibrationMeasured = [];
    this.events.push({ type: "calibrated", noiseFloorDbfs: this.floors.levelDbfs, noiseFloors: this.floors, disturbed: cal.disturbed, atS: cal.atS });
  }

  private keepHop(power: number, kurtosis: number): void {
    if (this.hopCount === this.hopPowers.length) {
      const grow = (a: Float64Array) => {
        const bigger = new Float64Array(2 * a.length);
        bigger.set(a);
        return bigger;
      };
      this.hopPowers = grow(this.hopPowers);
      this.hopKurtosis = grow(this.hopKurtosis);
    }
    this.hopKurtosis[this.hopCount] = kurtosis;
    this.hopPowers[this.hopCount++] = power;
  }

  private measure(view: Float32Array, at: number, withShape: boolean): FrameMeasure {
    this.spectraTotal++;
    this.spectraThisCall++;
    return measureFrame(view, at, this.judge.frame, this.bands, withShape);
  }

  /** Measure frames of the burst still sounding, up to `budget`. */
  private measureOpen(budget: number): number {
    const startHop = this.segmenter.openStartHop;
    if (startHop < 0) {
      this.open = null;
      return 0;
    }
    if (!this.open || this.open.startHop !== startHop) {
      this.open = {
        startHop,
        start: startHop * this.hopSize,
        measured: new Map(),
        onsetNext: 0,
        liftEndHop: -1,
        liftLength: 0,
        liftPlan: null,
        liftNext: 0,
      };
    }
    const o = this.open;
    // Its start is gone only for a burst already too long to be a stroke.
    if (o.start < this.base) return 0;
    const n = this.frameSize;
    const heard = this.base + this.length - o.start;
    const view = this.history.subarray(o.start - this.base, this.length);
    let spent = 0;
    const endHop = this.segmenter.liftEndHop;
    if (endHop >= 0) {
      if (endHop !== o.liftEndHop) {
        o.liftEndHop = endHop;
        o.liftLength = (endHop - startHop) * this.hopSize;
        const tooShortOrLong = this.judge.durationReason({ startHop, endHop }) !== null;
        o.liftPlan = tooShortOrLong ? null : planStroke(0, o.liftLength, n, this.sampleRate, this.options);
        o.liftNext = 0;
      }
      const plan = o.liftPlan;
      // The lift's end is behind the audio heard, so all these frames' samples are here.
      const limit = Math.min(o.liftLength, heard);
      for (; plan && o.liftNext < plan.at.length && spent < budget; o.liftNext++) {
        const at = plan.at[o.liftNext];
        const shape = plan.shape[o.liftNext];
        const m = o.measured.get(at);
        if (at + n > limit || (m && (m.flatness !== null || !shape))) continue;
        o.measured.set(at, this.measure(view, at, shape));
        spent++;
      }
    }
    for (; o.onsetNext < this.onsetAt.length && spent < budget; o.onsetNext++) {
      const at = this.onsetAt[o.onsetNext];
      if (at + n > heard) break;
      if (o.measured.has(at)) continue;
      o.measured.set(at, this.measure(view, at, this.onsetShape[o.onsetNext]));
      spent++;
    }
    return spent;
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
      // A closed stroke still waiting for frames keeps its audio: the wait is
      // a few blocks, so this holds little more than maxKeep.
      for (const p of this.pending) {
        if (!p.plan) continue;
        keepFrom = Math.min(keepFrom, p.start);
        break;
      }
      // So does a calibration frame not yet measured.
      if (this.calibrationMeasured.length < this.calibrationFrames.length) {
        keepFrom = Math.min(keepFrom, this.calibrationFrames[this.calibrationMeasured.length]);
      }
      const drop = keepFrom - this.base;
      const keepHop = Math.floor(keepFrom / this.hopSize);
      this.clipHops = this.clipHops.filter((h) => h >= keepHop);
      // Hop powers from the same hop on (a calibration's are needed until it finishes).
      const keepHopPowers = this.calibrationLevel || this.liveState === "calibrating" ? Math.min(keepHop, Math.floor(this.calibrationStart / this.hopSize)) : keepHop;
      if (keepHopPowers > this.hopBase) {
        const dropHops = Math.min(keepHopPowers - this.hopBase, this.hopCount);
        this.hopPowers.copyWithin(0, dropHops, this.hopCount);
        this.hopKurtosis.copyWithin(0, dropHops, this.hopCount);
        this.hopCount -= dropHops;
        this.hopBase += dropHops;
      }
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
