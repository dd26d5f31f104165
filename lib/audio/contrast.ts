// Onset contrast of one stroke: how much louder the high band is during the
// first onsetWindowMs than over the body (the middle half). A fresh seat
// starts each stroke with a gritty burst; a lapped one sounds the same from
// start to finish, and the contrast falls to about 0 dB.

import { bandBins, coveringPositions, framePositions, type SpectrumFrame } from "./frames";
import { bandPower, spectralFlatness } from "./features";
import type { AnalysisOptions } from "./options";

export interface StrokeContrast {
  /** Mean high-band power over the onset window, dBFS. */
  onsetDb: number;
  /** Mean high-band power over the body, dBFS. */
  bodyDb: number;
  contrastDb: number;
}

/** The high band actually measured at this rate: [lowHz, highHz]. */
export function highBandHz(sampleRateHz: number, options: AnalysisOptions): [number, number] {
  return [options.highBandLowHz, Math.min(options.highBandHighHz, sampleRateHz * options.highBandMaxFractionOfRate)];
}

/**
 * Mean power of bins first..last over [start, end) of `samples`, from Hann
 * frames `hop` apart (default half a frame: the periodic Hann window then
 * weights every inner sample equally, as it overlap-adds to a constant).
 */
export function meanBandPower(
  samples: Float32Array,
  start: number,
  end: number,
  frame: SpectrumFrame,
  first: number,
  last: number,
  hop: number = frame.size >> 1,
): number {
  const positions = framePositions(start, end, frame.size, hop);
  let sum = 0;
  for (const at of positions) {
    frame.analyze(samples, at, false, first, last);
    sum += bandPower(frame.power, first, last);
  }
  return sum / positions.length;
}

export interface StrokeMeasures extends StrokeContrast {
  /** Median spectral flatness over the shape band, from a spread of the same frames. */
  flatness: number;
  /** Full-band level of the body frames (Parseval: their Hann-weighted mean square), dBFS. */
  bodyLevelDbfs: number;
  /** Mean high-band power of the onset frames and of the body frames (linear; onsetDb and bodyDb in dB). */
  onsetPower: number;
  bodyPower: number;
  /** Each measured frame's voice-band and grind-band power, in plan order (onset frames first). */
  voicePowers: number[];
  grindPowers: number[];
  /** How many of them are body frames (the last ones). */
  bodyFrames: number;
}

/** The bins a stroke's frames are read over. */
export interface StrokeBands {
  /** High band, inclusive. */
  first: number;
  last: number;
  /** Shape band (flatness), inclusive. */
  shapeFirst: number;
  shapeLast: number;
  /** Voice band (talk over a stroke), inclusive. */
  voiceFirst: number;
  voiceLast: number;
}

export function strokeBands(sampleRateHz: number, frameSize: number, options: AnalysisOptions): StrokeBands {
  const [lowHz, highHz] = highBandHz(sampleRateHz, options);
  const [first, last] = bandBins(sampleRateHz, frameSize, lowHz, highHz);
  const [shapeFirst, shapeLast] = bandBins(
    sampleRateHz,
    frameSize,
    options.shapeBandLowHz,
    Math.min(options.shapeBandHighHz, sampleRateHz * options.highBandMaxFractionOfRate),
  );
  const [voiceFirst, voiceLast] = bandBins(sampleRateHz, frameSize, options.voiceBandLowHz, Math.min(options.voiceBandHighHz, sampleRateHz / 2));
  return { first, last, shapeFirst, shapeLast, voiceFirst, voiceLast };
}

/**
 * Which frames measure the stroke occupying samples[start, end): their start
 * positions, the onset window's first, then the body's, and which of them
 * also give a flatness. Both analyzers measure exactly these frames, the
 * live one as their audio arrives, so they agree to the bit.
 */
export interface StrokePlan {
  at: number[];
  onsetCount: number;
  shape: boolean[];
}

/** Onset-window frame positions of a stroke starting at `start`: depend on its end only when it is shorter than the window. */
export function onsetPositions(start: number, end: number, frameSize: number, sampleRateHz: number, options: AnalysisOptions): number[] {
  const onsetEnd = Math.min(end, start + Math.round((sampleRateHz * options.onsetWindowMs) / 1000));
  return coveringPositions(start, onsetEnd, frameSize, frameSize >> 1);
}

/**
 * The onset window at half-frame hops, because the burst changes quickly
 * there; the body, which is steady, at whole-frame hops; both spaced to cover
 * their region end to end; the body thinned to maxBodyFrames spread evenly
 * over it on a long stroke; flatness from shapeFramesPerStroke of all those
 * frames, spread evenly.
 */
export function planStroke(start: number, end: number, frameSize: number, sampleRateHz: number, options: AnalysisOptions): StrokePlan {
  const n = frameSize;
  const length = end - start;
  const onsetAt = onsetPositions(start, end, n, sampleRateHz, options);
  const bodyAt = spreadPositions(
    coveringPositions(start + Math.round(length * options.bodyStartFraction), start + Math.round(length * options.bodyEndFraction), n, n),
    options.maxBodyFrames,
  );
  const at = onsetAt.concat(bodyAt);
  return { at, onsetCount: onsetAt.length, shape: shapeFrames(at.length, options) };
}

/** Which of `total` frames give a flatness: shapeFramesPerStroke of them, spread evenly. */
export function shapeFrames(total: number, options: AnalysisOptions): boolean[] {
  const shapeCount = Math.min(total, options.shapeFramesPerStroke);
  const shape: boolean[] = new Array<boolean>(total);
  let nextShape = 0;
  for (let i = 0; i < total; i++) {
    const want = nextShape < shapeCount && i === Math.floor(((nextShape + 0.5) * total) / shapeCount);
    if (want) nextShape++;
    shape[i] = want;
  }
  return shape;
}

/** What one frame of a plan contributes. */
export interface FrameMeasure {
  /** High (grind) band power. */
  power: number;
  voicePower: number;
  meanSquare: number;
  /** Null when not asked for; NaN for silence, which the median leaves out. */
  flatness: number | null;
}

/** Analyse the frame at samples[at, at + size) (zeros past the array's end). */
export function measureFrame(samples: Float32Array, at: number, frame: SpectrumFrame, bands: StrokeBands, withShape: boolean): FrameMeasure {
  frame.analyze(samples, at, withShape, Math.min(bands.first, bands.voiceFirst), Math.max(bands.last, bands.voiceLast));
  return {
    power: bandPower(frame.power, bands.first, bands.last),
    voicePower: bandPower(frame.power, bands.voiceFirst, bands.voiceLast),
    meanSquare: frame.meanSquare,
    flatness: withShape ? spectralFlatness(frame.amplitude.subarray(bands.shapeFirst, bands.shapeLast + 1)) : null,
  };
}

/**
 * The stroke's measures from its plan's frames, `frames[i]` measuring
 * `plan.at[i]`. Sums run in plan order whoever computed the frames and when,
 * so the floating-point result is the same.
 */
export function combineStroke(plan: StrokePlan, frames: readonly FrameMeasure[]): StrokeMeasures {
  const total = plan.at.length;
  let onset = 0;
  let body = 0;
  let bodyMeanSquare = 0;
  const flat: number[] = [];
  const voicePowers: number[] = new Array<number>(total);
  const grindPowers: number[] = new Array<number>(total);
  for (let i = 0; i < total; i++) {
    const m = frames[i];
    voicePowers[i] = m.voicePower;
    grindPowers[i] = m.power;
    if (i < plan.onsetCount) onset += m.power;
    else {
      body += m.power;
      bodyMeanSquare += m.meanSquare;
    }
    if (plan.shape[i] && m.flatness !== null && Number.isFinite(m.flatness)) flat.push(m.flatness);
  }
  const bodyCount = total - plan.onsetCount;
  const onsetPower = onset / plan.onsetCount;
  const bodyPower = body / bodyCount;
  const onsetDb = 10 * Math.log10(onsetPower);
  const bodyDb = 10 * Math.log10(bodyPower);
  return {
    onsetDb,
    bodyDb,
    contrastDb: onsetDb - bodyDb,
    flatness: median(flat),
    bodyLevelDbfs: 10 * Math.log10(bodyMeanSquare / bodyCount),
    onsetPower,
    bodyPower,
    voicePowers,
    grindPowers,
    bodyFrames: bodyCount,
  };
}

/**
 * Everything the spectra tell about the stroke occupying samples[start, end),
 * in one pass over the frames of planStroke.
 */
export function measureStroke(
  samples: Float32Array,
  start: number,
  end: number,
  frame: SpectrumFrame,
  sampleRateHz: number,
  options: AnalysisOptions,
): StrokeMeasures {
  const bands = strokeBands(sampleRateHz, frame.size, options);
  const plan = planStroke(start, end, frame.size, sampleRateHz, options);
  const frames: FrameMeasure[] = new Array<FrameMeasure>(plan.at.length);
  for (let i = 0; i < plan.at.length; i++) frames[i] = measureFrame(samples, plan.at[i], frame, bands, plan.shape[i]);
  return combineStroke(plan, frames);
}

/** At most `max` of the positions, evenly spread, first and last kept. */
function spreadPositions(positions: number[], max: number): number[] {
  if (positions.length <= max) return positions;
  if (max === 1) return [positions[positions.length >> 1]];
  const out: number[] = [];
  for (let i = 0; i < max; i++) out.push(positions[Math.round((i * (positions.length - 1)) / (max - 1))]);
  return out;
}

export function median(values: number[]): number {
  if (values.length === 0) return 0;
  values.sort((a, b) => a - b);
  const mid = values.length >> 1;
  return values.length % 2 ? values[mid] : (values[mid - 1] + values[mid]) / 2;
}

/** Contrast of the stroke occupying samples[start, end). */
export function onsetContrast(
  samples: Float32Array,
  start: number,
  end: number,
  frame: SpectrumFrame,
  sampleRateHz: number,
  options: AnalysisOptions,
): StrokeContrast {
  const { onsetDb, bodyDb, contrastDb } = measureStroke(samples, start, end, frame, sampleRateHz, options);
  return { onsetDb, bodyDb, contrastDb };
}

/** Mean square of samples[start, end) in dBFS (time domain; full-band level). */
export function meanSquareDb(samples: Float32Array, start: number, end: number): number {
  let s = 0;
  for (let i = start; i < end; i++) s += samples[i] * samples[i];
  return 10 * Math.log10(s / Math.max(1, end - start));
}
