// The offline analyzer: a whole recording in, strokes, fade fit and verdict
// out. It runs the same stages in the same order as the live analyzer
// (live.ts) — envelope, segmentation, judging each burst on its own samples —
// so both report the same strokes for the same audio.

import { highBandHz, measureStroke, type StrokeMeasures } from "./contrast";
import { frameSizeFor, hopSizeFor, SpectrumFrame } from "./frames";
import { LevelMeter, levelSeries, noiseFloorDbfs } from "./level";
import { LiveAnalyzer, type LiveEvent } from "./live";
import { decodeWavMono, forEachMonoChunk, readWavInfo } from "./wav";
import {
  resolveOptions,
  validateSampleRate,
  type AnalysisOptions,
  type AnalysisOptionsInput,
} from "./options";
import { StrokeSegmenter, type Candidate, type RejectedSound } from "./strokes";
import { judgeSeat, type SeatVerdict, type StrokeFlag } from "./verdict";

export interface Stroke {
  /** 1-based, counting accepted strokes only. */
  index: number;
  startS: number;
  endS: number;
  onsetDb: number;
  bodyDb: number;
  contrastDb: number;
  flags: StrokeFlag[];
  /** Full-band level of the body above the noise floor, dB. */
  bodyAboveFloorDb: number;
  /** Median spectral flatness over the shape band. */
  flatness: number;
}

export type RecordingWarning = "clipping" | "too-quiet" | "low-sample-rate" | "no-strokes" | "ignored-sounds";

/** One sentence per warning, for screens and the command line. */
export const WARNING_TEXT: Readonly<Record<RecordingWarning, string>> = Object.freeze({
  clipping: "The recording clips: move the phone further away or lower the input gain.",
  "too-quiet": "Some strokes were too quiet to judge (body less than 10 dB above the room noise); move the phone closer.",
  "low-sample-rate": "The sample rate is too low for the full 2–10 kHz band; contrasts use a narrower band and compare only with recordings at the same rate.",
  "no-strokes": "No lapping strokes were found in the recording.",
  "ignored-sounds": "Sounds that were not lapping (speech, a ringing or tapping tool) were ignored.",
});

export type NoiseFloorSource = "lead-in" | "quietest-frames" | "given" | "calibration";

export interface AnalysisResult {
  sampleRate: number;
  durationS: number;
  noiseFloorDbfs: number;
  noiseFloorSource: NoiseFloorSource;
  /** The high band measured at this rate, Hz. */
  highBandHz: [number, number];
  strokes: Stroke[];
  rejected: RejectedSound[];
  verdict: SeatVerdict;
  warnings: RecordingWarning[];
}

export type Judgement = { kind: "stroke"; stroke: Omit<Stroke, "index"> } | { kind: "rejected"; sound: RejectedSound };

/**
 * Judges one burst on its own samples. Holds the one SpectrumFrame both
 * analyzers reuse for every stroke.
 */
export class StrokeJudge {
  readonly frame: SpectrumFrame;
  readonly hopSize: number;
  private readonly sampleRate: number;
  private readonly options: AnalysisOptions;

  constructor(sampleRateHz: number, options: AnalysisOptions) {
    this.sampleRate = sampleRateHz;
    this.options = options;
    this.frame = new SpectrumFrame(frameSizeFor(sampleRateHz, options.frameTargetMs));
    this.hopSize = hopSizeFor(sampleRateHz, options.hopMs);
  }

  /** Is the candidate too short or too long? Decided from hops alone, before any sample is read. */
  durationReason(c: Candidate): "too-short" | "too-long" | null {
    const ms = ((c.endHop - c.startHop) * this.hopSize * 1000) / this.sampleRate;
    if (ms < this.options.minStrokeMs) return "too-short";
    if (ms > this.options.maxStrokeMs) return "too-long";
    return null;
  }

  /**
   * `strokeSamples` is exactly the burst's audio (a view), so frames can
   * never see audio the other analyzer would not have.
   */
  judge(c: Candidate, strokeSamples: Float32Array | null, floorDbfs: number, clipped: boolean): Judgement {
    const sr = this.sampleRate;
    const o = this.options;
    const startS = (c.startHop * this.hopSize) / sr;
    const endS = (c.endHop * this.hopSize) / sr;
    const reason = this.durationReason(c);
    if (reason || !strokeSamples) {
      return { kind: "rejected", sound: { startS, endS, reason: reason ?? "too-long", flatness: null } };
    }
    return this.judgeMeasured(c, measureStroke(strokeSamples, 0, strokeSamples.length, this.frame, sr, o), floorDbfs, clipped);
  }

  /**
   * The judgement from the stroke's measures, however they were computed:
   * the live analyzer gathers them frame by frame while the stroke sounds
   * (`measureStroke` over the stroke's own samples, `planStroke(0, length)`).
   */
  judgeMeasured(c: Candidate, measures: StrokeMeasures, floorDbfs: number, clipped: boolean): Judgement {
    const o = this.options;
    const startS = (c.startHop * this.hopSize) / this.sampleRate;
    const endS = (c.endHop * this.hopSize) / this.sampleRate;
    const { flatness, bodyLevelDbfs, ...contrast } = measures;
    if (flatness < o.minFlatness) {
      return { kind: "rejected", sound: { startS, endS, reason: "not-noise-like", flatness } };
    }
    const bodyAboveFloorDb = bodyLevelDbfs - floorDbfs;
    const flags: StrokeFlag[] = [];
    if (clipped) flags.push("clipping");
    if (bodyAboveFloorDb < o.minBodyAboveFloorDb) flags.push("too-quiet");
    return { kind: "stroke", stroke: { startS, endS, ...contrast, flags, bodyAboveFloorDb, flatness } };
  }
}

export interface AnalyzeRecordingInput {
  sampleRate: number;
  options?: AnalysisOptionsInput;
  /** A floor measured elsewhere (e.g. a calibration), dBFS; skips estimation. */
  noiseFloorDbfs?: number;
}

export function recordingWarnings(
  strokes: readonly Stroke[],
  rejected: readonly RejectedSound[],
  clippedAnywhere: boolean,
  sampleRateHz: number,
  options: AnalysisOptions,
): RecordingWarning[] {
  const w: RecordingWarning[] = [];
  if (clippedAnywhere) w.push("clipping");
  if (strokes.some((s) => s.flags.includes("too-quiet"))) w.push("too-quiet");
  if (highBandHz(sampleRateHz, options)[1] < options.highBandHighHz) w.push("low-sample-rate");
  if (strokes.length === 0) w.push("no-strokes");
  if (rejected.some((r) => r.reason === "not-noise-like")) w.push("ignored-sounds");
  return w;
}

/** Analyse a whole mono recording (full scale ±1). */
export function analyzeRecording(samples: Float32Array, input: AnalyzeRecordingInput): AnalysisResult {
  const sr = validateSampleRate(input.sampleRate);
  const o = resolveOptions(input.options ?? {});
  if (!(samples instanceof Float32Array)) throw new TypeError("samples must be a Float32Array");
  const series = levelSeries(samples, sr, o);
  const { levels, clipped, hopSize } = series;
  const leadInHops = Math.min(levels.length, Math.floor(Math.round((sr * o.leadInMs) / 1000) / hopSize));
  let floor: number;
  let source: NoiseFloorSource;
  if (input.noiseFloorDbfs !== undefined) {
    if (!Number.isFinite(input.noiseFloorDbfs)) throw new RangeError(`noiseFloorDbfs must be finite, got ${input.noiseFloorDbfs}`);
    floor = input.noiseFloorDbfs;
    source = "given";
  } else if (leadInHops > 0) {
    floor = noiseFloorDbfs(levels, o, 0, leadInHops);
    source = "lead-in";
  } else {
    floor = noiseFloorDbfs(levels, o);
    source = "quietest-frames";
  }
  const judge = new StrokeJudge(sr, o);
  const segmenter = new StrokeSegmenter(o, series.windowHops);
  segmenter.setNoiseFloor(floor);
  const strokes: Stroke[] = [];
  const rejected: RejectedSound[] = [];
  const take = (c: Candidate) => {
    let clip = false;
    for (let h = c.startHop; h < c.endHop && h < clipped.length; h++) if (clipped[h]) clip = true;
    const view = judge.durationReason(c) ? null : samples.subarray(c.startHop * hopSize, c.endHop * hopSize);
    const j = judge.judge(c, view, floor, clip);
    if (j.kind === "stroke") strokes.push({ index: strokes.length + 1, ...j.stroke });
    else rejected.push(j.sound);
  };
  for (let h = leadInHops; h < levels.length; h++) {
    const c = segmenter.step(h, levels[h]);
    if (c) take(c);
  }
  const last = segmenter.finish();
  if (last) take(last);
  let clippedAnywhere = false;
  for (let h = 0; h < clipped.length; h++) if (clipped[h]) clippedAnywhere = true;
  return {
    sampleRate: sr,
    durationS: samples.length / sr,
    noiseFloorDbfs: floor,
    noiseFloorSource: source,
    highBandHz: highBandHz(sr, o),
    strokes,
    rejected,
    verdict: judgeSeat(strokes, o),
    warnings: recordingWarnings(strokes, rejected, clippedAnywhere, sr, o),
  };
}

/**
 * Analyse a WAV file's bytes without materialising the whole decoded
 * recording: one pass of the level meter for the noise floor, then the live
 * analyzer over the same chunks. Same result as decoding with decodeWavMono
 * and calling analyzeRecording — the live and offline paths agree by design.
 */
export function analyzeWavBytes(bytes: Uint8Array, options: AnalysisOptionsInput = {}): AnalysisResult {
  const o = resolveOptions(options);
  const info = readWavInfo(bytes);
  const sr = validateSampleRate(info.sampleRate);
  const chunk = 1 << 15;
  const meter = LevelMeter.fromOptions(sr, o);
  const levels = new Float64Array(Math.floor(info.frames / meter.hopSize));
  let clippedAnywhere = false;
  let h = 0;
  const onHop = (level: number, clipped: boolean) => {
    if (h < levels.length) levels[h++] = level;
    if (clipped) clippedAnywhere = true;
  };
  forEachMonoChunk(bytes, chunk, (samples) => meter.push(samples, 0, samples.length, onHop));
  const leadInHops = Math.min(levels.length, Math.floor(Math.round((sr * o.leadInMs) / 1000) / meter.hopSize));
  // The live analyzer calibrates on exactly the hops an offline lead-in uses.
  const useCalibration = leadInHops > 0 && o.leadInMs >= 100;
  const floor = leadInHops > 0 ? noiseFloorDbfs(levels, o, 0, leadInHops) : noiseFloorDbfs(levels, o);
  const live = useCalibration
    ? new LiveAnalyzer({ sampleRate: sr, options: { ...o, calibrationMs: o.leadInMs } })
    : new LiveAnalyzer({ sampleRate: sr, options: o, noiseFloorDbfs: floor });
  if (leadInHops > 0 && !useCalibration) {
    const decoded = decodeWavMono(bytes);
    return analyzeRecording(decoded.samples, { sampleRate: sr, options: o });
  }
  const rejected: RejectedSound[] = [];
  const collect = (events: readonly LiveEvent[]) => {
    for (const e of events) if (e.type === "rejected") rejected.push(e.sound);
  };
  forEachMonoChunk(bytes, chunk, (samples) => collect(live.push(samples)));
  collect(live.flush());
  const strokes = [...live.strokes];
  return {
    sampleRate: sr,
    durationS: info.frames / sr,
    noiseFloorDbfs: floor,
    noiseFloorSource: leadInHops > 0 ? "lead-in" : "quietest-frames",
    highBandHz: highBandHz(sr, o),
    strokes,
    rejected,
    verdict: judgeSeat(strokes, o),
    warnings: recordingWarnings(strokes, rejected, clippedAnywhere, sr, o),
  };
}
