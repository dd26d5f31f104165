// The offline analyzer: a whole recording in, strokes, fade fit and verdict
// out. It runs the same stages in the same order as the live analyzer
// (live.ts) — envelope, segmentation, judging each burst on its own samples —
// so both report the same strokes for the same audio.

import { highBandHz, measureStroke, median, strokeBands, type StrokeBands, type StrokeMeasures } from "./contrast";
import {
  bandFloors,
  dbToPower,
  measureFloorFrame,
  pauseFramePositions,
  type FloorFrame,
  type NoiseFloors,
} from "./floors";
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
import { FLAG_TEXT, judgeSeat, type SeatVerdict, type StrokeFlag } from "./verdict";

export { FLAG_TEXT };

export interface Stroke {
  /** 1-based, counting accepted strokes only. */
  index: number;
  startS: number;
  endS: number;
  /** Grind-band power of the onset window and of the body, less the calibrated grind-band noise, dBFS. */
  onsetDb: number;
  bodyDb: number;
  contrastDb: number;
  /** Reasons to leave the stroke out of the verdict; empty for a judged stroke. */
  flags: StrokeFlag[];
  /** Grind-band body power over the grind-band noise floor (after subtracting it), dB. */
  bandSnrDb: number;
  /** Median spectral flatness over the shape band. */
  flatness: number;
}

export type RecordingWarning =
  | "clipping"
  | "too-quiet"
  | "low-sample-rate"
  | "no-strokes"
  | "ignored-sounds"
  | "left-out"
  | "calibration-disturbed";

/** One sentence per warning, for screens and the command line. */
export const WARNING_TEXT: Readonly<Record<RecordingWarning, string>> = Object.freeze({
  clipping: "The recording clips: move the phone further away or lower the input gain.",
  "too-quiet": "Some strokes were too quiet to judge against the room noise in the 2–10 kHz band; move the phone closer.",
  "low-sample-rate": "The sample rate is too low for the full 2–10 kHz band; contrasts use a narrower band and compare only with recordings at the same rate.",
  "no-strokes": "No lapping strokes were found in the recording.",
  "ignored-sounds": "Sounds that were not lapping (speech, a ringing or tapping tool) were ignored.",
  "left-out": "Some strokes were left out of the verdict (talk, a knock or rattle, clipping, too quiet, or a start not heard); their figures are kept for review.",
  "calibration-disturbed": "There was sound during the quiet start; the room noise was measured on its quiet part only.",
});


export type NoiseFloorSource = "lead-in" | "quietest-frames" | "given" | "calibration";

export interface AnalysisResult {
  sampleRate: number;
  durationS: number;
  /** Level-band floor, dBFS. */
  noiseFloorDbfs: number;
  /** Floors per band: level, grind, voice. */
  noiseFloors: NoiseFloors;
  noiseFloorSource: NoiseFloorSource;
  /** The high band measured at this rate, Hz. */
  highBandHz: [number, number];
  strokes: Stroke[];
  rejected: RejectedSound[];
  verdict: SeatVerdict;
  warnings: RecordingWarning[];
}

export type Judgement = { kind: "stroke"; stroke: Omit<Stroke, "index"> } | { kind: "rejected"; sound: RejectedSound };

/** Hops at a stroke's start left out of the kurtosis test: the stroke coming in is itself a sudden change. */
const IMPULSE_SKIP_HOPS = 3;

/** Clean strokes' voice-band share kept for the session reference. */
const VOICE_REFERENCE_STROKES = 8;
/**
 * Lowest voice-band share of the body the reference may take: about white
 * noise's ((1000 − 150) / (10 000 − 2000) Hz), so a lapping sound with almost
 * nothing below 1 kHz does not make every breath look like talk.
 */
const VOICE_REFERENCE_MIN = 0.1;

/**
 * Judges one burst on its own samples. Holds the one SpectrumFrame both
 * analyzers reuse for every stroke, and what the session so far tells about
 * talk: where the last sound rejected as speech ended, and the voice-band
 * share of clean strokes. Both analyzers judge bursts in the same order, so
 * this state is the same in both.
 */
export class StrokeJudge {
  readonly frame: SpectrumFrame;
  readonly hopSize: number;
  private readonly sampleRate: number;
  private readonly options: AnalysisOptions;
  private lastSpeechEndS = -Infinity;
  private voiceShares: number[] = [];

  constructor(sampleRateHz: number, options: AnalysisOptions) {
    this.sampleRate = sampleRateHz;
    this.options = options;
    this.frame = new SpectrumFrame(frameSizeFor(sampleRateHz, options.frameTargetMs));
    this.hopSize = hopSizeFor(sampleRateHz, options.hopMs);
  }

  /** Forget the session (a new recording or a reset). */
  reset(): void {
    this.lastSpeechEndS = -Infinity;
    this.voiceShares = [];
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
   * never see audio the other analyzer would not have; `hopPowers` its hops'
   * level-band powers.
   */
  judge(c: Candidate, strokeSamples: Float32Array | null, floors: NoiseFloors, clipped: boolean, hops: StrokeHops): Judgement {
    const reason = this.durationReason(c);
    if (reason || !strokeSamples) {
      const startS = (c.startHop * this.hopSize) / this.sampleRate;
      const endS = (c.endHop * this.hopSize) / this.sampleRate;
      return { kind: "rejected", sound: { startS, endS, reason: reason ?? "too-long", flatness: null } };
    }
    const measures = measureStroke(strokeSamples, 0, strokeSamples.length, this.frame, this.sampleRate, this.options);
    return this.judgeMeasured(c, measures, floors, clipped, hops);
  }

  /**
   * The judgement from the stroke's measures, however they were computed:
   * the live analyzer gathers them frame by frame while the stroke sounds
   * (`measureStroke` over the stroke's own samples, `planStroke(0, length)`).
   */
  judgeMeasured(c: Candidate, measures: StrokeMeasures, floors: NoiseFloors, clipped: boolean, hops: StrokeHops): Judgement {
    const o = this.options;
    const startS = (c.startHop * this.hopSize) / this.sampleRate;
    const endS = (c.endHop * this.hopSize) / this.sampleRate;
    if (measures.flatness < o.minFlatness) {
      this.lastSpeechEndS = endS;
      return { kind: "rejected", sound: { startS, endS, reason: "not-noise-like", flatness: measures.flatness } };
    }
    // Spectral subtraction of the calibrated grind-band noise: what is left
    // is the lapping sound's own power, whose ratio is the contrast.
    const noise = dbToPower(floors.grindDbfs, o);
    const least = noise * 1e-3;
    const onset = Math.max(measures.onsetPower - noise, least);
    const body = Math.max(measures.bodyPower - noise, least);
    const onsetDb = 10 * Math.log10(onset);
    const bodyDb = 10 * Math.log10(body);
    const bandSnrDb = bodyDb - 10 * Math.log10(noise);
    const flags: StrokeFlag[] = [];
    if (clipped) flags.push("clipping");
    if (bandSnrDb < o.minBandSnrDb) flags.push("too-quiet");
    const voice = this.voiceOver(measures, body, floors);
    // Talk that happened to be noise-like enough, not a stroke: voiced, less
    // flat than lapping stays with a voice over it, and with a grind band
    // that comes and goes (words and the gaps between them) where lapping
    // under a voice holds it steady.
    if (voice.frames >= o.voiceMinFrames && measures.flatness < o.minFlatnessWithVoice && !steadyBody(measures.grindPowers, measures.bodyFrames)) {
      this.lastSpeechEndS = endS;
      return { kind: "rejected", sound: { startS, endS, reason: "not-noise-like", flatness: measures.flatness } };
    }
    if (voice.frames >= o.voiceMinFrames || startS - this.lastSpeechEndS <= o.speechGuardMs / 1000) flags.push("speech");
    if (impulsive(hops, o)) flags.push("impulsive");
    if (c.startHeard === false) flags.push("start-not-heard");
    if (c.endHeard === false) flags.push("end-not-heard");
    if (flags.length === 0) {
      this.voiceShares.push(voice.bodyShare);
      if (this.voiceShares.length > VOICE_REFERENCE_STROKES) this.voiceShares.shift();
    }
    return {
      kind: "stroke",
      stroke: { startS, endS, onsetDb, bodyDb, contrastDb: onsetDb - bodyDb, flags, bandSnrDb, flatness: measures.flatness },
    };
  }

  /**
   * Voiced frames among the measured ones, and the body frames' median
   * voice-band share (voice-band power above its noise, over the body's
   * grind-band power) for the session reference.
   */
  private voiceOver(measures: StrokeMeasures, bodyPower: number, floors: NoiseFloors): { frames: number; bodyShare: number } {
    const o = this.options;
    const noise = dbToPower(floors.voiceDbfs, o);
    const aboveNoise = noise * 10 ** (o.voiceOverNoiseDb / 10);
    const absolute = bodyPower * 10 ** (o.voiceOverGrindMaxDb / 10);
    const reference =
      this.voiceShares.length > 0
        ? bodyPower * Math.max(VOICE_REFERENCE_MIN, median([...this.voiceShares])) * 10 ** (o.voiceOverReferenceDb / 10)
        : Infinity;
    const limit = Math.min(absolute, reference);
    const powers = measures.voicePowers;
    const onsetCount = powers.length - measures.bodyFrames;
    let frames = 0;
    const bodyShares: number[] = [];
    for (let i = 0; i < powers.length; i++) {
      const excess = powers[i] - noise;
      if (excess >= aboveNoise && excess >= limit) frames++;
      if (i >= onsetCount) bodyShares.push(Math.max(0, excess) / bodyPower);
    }
    return { frames, bodyShare: median(bodyShares) };
  }
}

/**
 * Does the body hold steady, as lapping does: at least three quarters of the
 * body frames' grind-band powers within 6 dB of their median?
 */
export function steadyBody(grindPowers: readonly number[], bodyFrames: number): boolean {
  const body = grindPowers.slice(grindPowers.length - bodyFrames);
  if (body.length === 0) return true;
  const mid = median([...body]);
  let near = 0;
  for (const p of body) if (p <= mid * 4 && p >= mid / 4) near++;
  return 4 * near >= 3 * body.length;
}

/** The level band's view of a stroke's hops, first to last. */
export interface StrokeHops {
  powers: ArrayLike<number>;
  kurtosis: ArrayLike<number>;
}

/**
 * A knock or a rattle over a stroke: hops whose level-band power stands
 * impulseSpikeDb above the median of their neighbours within the stroke, or
 * whose kurtosis reaches impulseKurtosis (clicks too quick to lift a hop's
 * power; the first hops, where the stroke itself comes in, are left out of
 * this test). Runs of adjacent such hops count once; impulseMinSpikes of
 * them, or one power spike 10 dB beyond the threshold, flag it.
 */
export function impulsive(hops: StrokeHops, options: AnalysisOptions): boolean {
  const powers = hops.powers;
  const n = powers.length;
  const k = options.impulseNeighbourHops;
  const spike = 10 ** (options.impulseSpikeDb / 10);
  const knock = spike * 10;
  // Neighbours sorted by insertion into one small buffer: this runs on every
  // hop of every stroke, inside the block that reports it.
  const near = new Float64Array(2 * k);
  let runs = 0;
  let inRun = false;
  for (let i = 0; i < n; i++) {
    let m = 0;
    const hi = Math.min(n - 1, i + k);
    for (let j = Math.max(0, i - k); j <= hi; j++) {
      if (j === i) continue;
      const v = powers[j];
      let at = m++;
      while (at > 0 && near[at - 1] > v) {
        near[at] = near[at - 1];
        at--;
      }
      near[at] = v;
    }
    const ref = m % 2 ? near[m >> 1] : (near[(m >> 1) - 1] + near[m >> 1]) / 2;
    const ratio = m < k ? 0 : powers[i] / ref;
    if (ratio >= knock) return true;
    const peaky = i >= IMPULSE_SKIP_HOPS && hops.kurtosis[i] >= options.impulseKurtosis;
    if (ratio >= spike || peaky) {
      if (!inRun) runs++;
      inRun = true;
      if (runs >= options.impulseMinSpikes) return true;
    } else inRun = false;
  }
  return false;
}

export interface AnalyzeRecordingInput {
  sampleRate: number;
  options?: AnalysisOptionsInput;
  /**
   * Floors measured elsewhere (e.g. a calibration); skips estimation. A
   * number is the level floor alone: the grind-band floor is then taken as
   * that level (the level band holds the grind band) and the voice band's as
   * negligible.
   */
  noiseFloorDbfs?: number | NoiseFloors;
}

/** Floors from a bare level floor, or checked ones given whole. */
export function givenFloors(given: number | NoiseFloors, options: AnalysisOptions): NoiseFloors {
  const floors = typeof given === "number" ? { levelDbfs: given, grindDbfs: given, voiceDbfs: options.minNoiseFloorDbfs } : given;
  for (const [name, value] of Object.entries(floors)) {
    if (typeof value !== "number" || !Number.isFinite(value) || value > 0) {
      throw new RangeError(`noise floor ${name} must be a finite level at or below 0 dBFS, got ${String(value)}`);
    }
  }
  return { levelDbfs: floors.levelDbfs, grindDbfs: floors.grindDbfs, voiceDbfs: floors.voiceDbfs };
}

export function recordingWarnings(
  strokes: readonly Stroke[],
  rejected: readonly RejectedSound[],
  clippedAnywhere: boolean,
  sampleRateHz: number,
  options: AnalysisOptions,
  calibrationWasDisturbed = false,
): RecordingWarning[] {
  const w: RecordingWarning[] = [];
  if (clippedAnywhere) w.push("clipping");
  if (strokes.some((s) => s.flags.includes("too-quiet"))) w.push("too-quiet");
  if (highBandHz(sampleRateHz, options)[1] < options.highBandHighHz) w.push("low-sample-rate");
  if (strokes.length === 0) w.push("no-strokes");
  if (rejected.some((r) => r.reason === "not-noise-like")) w.push("ignored-sounds");
  if (strokes.some((s) => s.flags.length > 0)) w.push("left-out");
  if (calibrationWasDisturbed) w.push("calibration-disturbed");
  return w;
}

/** Is there a clipping run anywhere in the samples (as the level meter counts them)? */
export function hasClipping(samples: Float32Array, options: AnalysisOptions): boolean {
  const c = options.clipLevel;
  let run = 0;
  for (let i = 0; i < samples.length; i++) {
    const x = samples[i];
    if (x >= c || x <= -c) {
      if (++run >= options.clipRunSamples) return true;
    } else run = 0;
  }
  return false;
}

/**
 * A recording with a quiet lead-in is the bench screen's situation: the
 * lead-in is its calibration, with everything the live analyzer does about
 * it (a sound during it, a room quieter than measured). So it is analysed by
 * the live analyzer itself, in chunks.
 */
function analyzeWithCalibration(samples: Float32Array, sampleRateHz: number, options: AnalysisOptions): AnalysisResult {
  const live = new LiveAnalyzer({ sampleRate: sampleRateHz, options: { ...options, calibrationMs: options.leadInMs } });
  const rejected: RejectedSound[] = [];
  const collect = (events: readonly LiveEvent[]) => {
    for (const e of events) if (e.type === "rejected") rejected.push(e.sound);
  };
  for (let at = 0; at < samples.length; at += 1 << 15) collect(live.push(samples.subarray(at, at + (1 << 15))));
  collect(live.flush());
  return liveResult(live, rejected, samples.length / sampleRateHz, "lead-in", hasClipping(samples, options));
}

function liveResult(live: LiveAnalyzer, rejected: RejectedSound[], durationS: number, source: NoiseFloorSource, clippedAnywhere: boolean): AnalysisResult {
  const o = live.options;
  const sr = live.sampleRate;
  const strokes = [...live.strokes];
  const low = o.minNoiseFloorDbfs;
  // A recording too short to finish its calibration has no floors: the lowest stand in.
  const floors = live.noiseFloors ?? { levelDbfs: low, grindDbfs: low, voiceDbfs: low };
  return resultOf(sr, o, { durationS, floors, source, strokes, rejected, clippedAnywhere, disturbed: live.calibrationDisturbed });
}

/** The result of an analysis from what it found, verdict and warnings derived. */
function resultOf(
  sr: number,
  o: AnalysisOptions,
  found: {
    durationS: number;
    floors: NoiseFloors;
    source: NoiseFloorSource;
    strokes: Stroke[];
    rejected: RejectedSound[];
    clippedAnywhere: boolean;
    disturbed: boolean;
  },
): AnalysisResult {
  return {
    sampleRate: sr,
    durationS: found.durationS,
    noiseFloorDbfs: found.floors.levelDbfs,
    noiseFloors: found.floors,
    noiseFloorSource: found.source,
    highBandHz: highBandHz(sr, o),
    strokes: found.strokes,
    rejected: found.rejected,
    verdict: judgeSeat(found.strokes, o),
    warnings: recordingWarnings(found.strokes, found.rejected, found.clippedAnywhere, sr, o, found.disturbed),
  };
}

/** Analyse a whole mono recording (full scale ±1). */
export function analyzeRecording(samples: Float32Array, input: AnalyzeRecordingInput): AnalysisResult {
  const sr = validateSampleRate(input.sampleRate);
  const o = resolveOptions(input.options ?? {});
  if (!(samples instanceof Float32Array)) throw new TypeError("samples must be a Float32Array");
  if (input.noiseFloorDbfs === undefined && o.leadInMs >= 100) return analyzeWithCalibration(samples, sr, o);
  const series = levelSeries(samples, sr, o);
  const { levels, clipped, hopSize, hopPowers, hopKurtosis } = series;
  const leadInHops = Math.min(levels.length, Math.floor(Math.round((sr * o.leadInMs) / 1000) / hopSize));
  const judge = new StrokeJudge(sr, o);
  let floors: NoiseFloors;
  let source: NoiseFloorSource;
  if (input.noiseFloorDbfs !== undefined) {
    floors = givenFloors(input.noiseFloorDbfs, o);
    source = "given";
  } else if (leadInHops > 0) {
    // A lead-in too short to calibrate on: its level floor alone.
    floors = givenFloors(noiseFloorDbfs(levels, o, 0, leadInHops), o);
    source = "lead-in";
  } else {
    const levelDbfs = noiseFloorDbfs(levels, o);
    const bands = strokeBands(sr, judge.frame.size, o);
    const at = pauseFramePositions(levels.length * hopSize, judge.frame.size, hopSize, hopPowers, levelDbfs, o);
    const frames = at.map((p) => measureFloorFrame(samples, p, p, judge.frame, bands));
    floors = bandFloors(levelDbfs, frames, frames.map(() => true), o);
    source = "quietest-frames";
  }
  const segmenter = new StrokeSegmenter(o, series.windowHops);
  segmenter.setNoiseFloor(floors.levelDbfs);
  const strokes: Stroke[] = [];
  const rejected: RejectedSound[] = [];
  const take = (c: Candidate) => {
    let clip = false;
    for (let h = c.startHop; h < c.endHop && h < clipped.length; h++) if (clipped[h]) clip = true;
    const view = judge.durationReason(c) ? null : samples.subarray(c.startHop * hopSize, c.endHop * hopSize);
    const j = judge.judge(c, view, floors, clip, { powers: hopPowers.subarray(c.startHop, c.endHop), kurtosis: hopKurtosis.subarray(c.startHop, c.endHop) });
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
  return resultOf(sr, o, { durationS: samples.length / sr, floors, source, strokes, rejected, clippedAnywhere, disturbed: false });
}

/**
 * Analyse a WAV file's bytes without materialising the whole decoded
 * recording: one pass of the level meter for the noise floor, then the live
 * analyzer over the same chunks (with a short pass for the pause frames of a
 * file without a lead-in). Same result as decoding with decodeWavMono and
 * calling analyzeRecording — the live and offline paths agree by design.
 */
export function analyzeWavBytes(bytes: Uint8Array, options: AnalysisOptionsInput = {}): AnalysisResult {
  const o = resolveOptions(options);
  const info = readWavInfo(bytes);
  const sr = validateSampleRate(info.sampleRate);
  const chunk = 1 << 15;
  const meter = LevelMeter.fromOptions(sr, o);
  const hops = Math.floor(info.frames / meter.hopSize);
  const levels = new Float64Array(hops);
  const hopPowers = new Float64Array(hops);
  let clippedAnywhere = false;
  let h = 0;
  const onHop = (level: number, clipped: boolean, power: number) => {
    if (h < hops) {
      levels[h] = level;
      hopPowers[h] = power;
      h++;
    }
    if (clipped) clippedAnywhere = true;
  };
  forEachMonoChunk(bytes, chunk, (samples) => meter.push(samples, 0, samples.length, onHop));
  const leadInHops = Math.min(levels.length, Math.floor(Math.round((sr * o.leadInMs) / 1000) / meter.hopSize));
  // The live analyzer calibrates on exactly the hops an offline lead-in uses.
  if (leadInHops > 0 && o.leadInMs < 100) {
    const decoded = decodeWavMono(bytes);
    return analyzeRecording(decoded.samples, { sampleRate: sr, options: o });
  }
  let live: LiveAnalyzer;
  if (leadInHops > 0) {
    live = new LiveAnalyzer({ sampleRate: sr, options: { ...o, calibrationMs: o.leadInMs } });
  } else {
    const levelDbfs = noiseFloorDbfs(levels, o);
    const judge = new StrokeJudge(sr, o);
    const at = pauseFramePositions(hops * meter.hopSize, judge.frame.size, meter.hopSize, hopPowers, levelDbfs, o);
    const frames = framesAt(bytes, chunk, at, judge.frame, strokeBands(sr, judge.frame.size, o));
    live = new LiveAnalyzer({ sampleRate: sr, options: o, noiseFloorDbfs: bandFloors(levelDbfs, frames, frames.map(() => true), o) });
  }
  const rejected: RejectedSound[] = [];
  const collect = (events: readonly LiveEvent[]) => {
    for (const e of events) if (e.type === "rejected") rejected.push(e.sound);
  };
  forEachMonoChunk(bytes, chunk, (samples) => collect(live.push(samples)));
  collect(live.flush());
  return liveResult(live, rejected, info.frames / sr, leadInHops > 0 ? "lead-in" : "quietest-frames", clippedAnywhere);
}

/** Floor frames at sorted absolute positions, read from the file's chunks through a one-frame carry buffer. */
function framesAt(bytes: Uint8Array, chunk: number, positions: readonly number[], frame: SpectrumFrame, bands: StrokeBands): FloorFrame[] {
  const n = frame.size;
  const buffer = new Float32Array(n);
  const carry = new Float32Array(n);
  const out: FloorFrame[] = [];
  let next = 0;
  let offset = 0;
  forEachMonoChunk(bytes, chunk, (samples) => {
    const end = offset + samples.length;
    while (next < positions.length && positions[next] + n <= end) {
      const at = positions[next];
      for (let i = 0; i < n; i++) {
        const abs = at + i;
        buffer[i] = abs >= offset ? samples[abs - offset] : carry[abs - (offset - n)];
      }
      out.push(measureFloorFrame(buffer, 0, at, frame, bands));
      next++;
    }
    // Keep the last frame's worth of samples for a frame that straddles chunks.
    if (samples.length >= n) carry.set(samples.subarray(samples.length - n));
    else {
      carry.copyWithin(0, samples.length);
      carry.set(samples, n - samples.length);
    }
    offset = end;
  });
  return out;
}
