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
}

/**
 * Everything the spectra tell about the stroke occupying samples[start, end),
 * in one pass over as few frames as possible: the onset window at half-frame
 * hops, because the burst changes quickly there; the body, which is steady,
 * at whole-frame hops; both spaced to cover their region end to end; thinned to maxBodyFrames spread evenly over it on a
 * long stroke; flatness from shapeFramesPerStroke of those frames.
 */
export function measureStroke(
  samples: Float32Array,
  start: number,
  end: number,
  frame: SpectrumFrame,
  sampleRateHz: number,
  options: AnalysisOptions,
): StrokeMeasures {
  const n = frame.size;
  const [lowHz, highHz] = highBandHz(sampleRateHz, options);
  const [first, last] = bandBins(sampleRateHz, n, lowHz, highHz);
  const [shapeFirst, shapeLast] = bandBins(
    sampleRateHz,
    n,
    options.shapeBandLowHz,
    Math.min(options.shapeBandHighHz, sampleRateHz * options.highBandMaxFractionOfRate),
  );
  const length = end - start;
  const onsetEnd = Math.min(end, start + Math.round((sampleRateHz * options.onsetWindowMs) / 1000));
  const onsetAt = coveringPositions(start, onsetEnd, n, n >> 1);
  const bodyAt = spreadPositions(
    coveringPositions(start + Math.round(length * options.bodyStartFraction), start + Math.round(length * options.bodyEndFraction), n, n),
    options.maxBodyFrames,
  );
  const total = onsetAt.length + bodyAt.length;
  const shapeCount = Math.min(total, options.shapeFramesPerStroke);
  let nextShape = 0;
  const flat: number[] = [];
  let onset = 0;
  let body = 0;
  let bodyMeanSquare = 0;
  for (let i = 0; i < total; i++) {
    const wantShape = nextShape < shapeCount && i === Math.floor(((nextShape + 0.5) * total) / shapeCount);
    const isOnset = i < onsetAt.length;
    frame.analyze(samples, isOnset ? onsetAt[i] : bodyAt[i - onsetAt.length], wantShape, first, last);
    const p = bandPower(frame.power, first, last);
    if (isOnset) onset += p;
    else {
      body += p;
      bodyMeanSquare += frame.meanSquare;
    }
    if (wantShape) {
      nextShape++;
      const f = spectralFlatness(frame.amplitude.subarray(shapeFirst, shapeLast + 1));
      if (Number.isFinite(f)) flat.push(f);
    }
  }
  const onsetDb = 10 * Math.log10(onset / onsetAt.length);
  const bodyDb = 10 * Math.log10(body / bodyAt.length);
  return {
    onsetDb,
    bodyDb,
    contrastDb: onsetDb - bodyDb,
    flatness: median(flat),
    bodyLevelDbfs: 10 * Math.log10(bodyMeanSquare / bodyAt.length),
  };
}

/** At most `max` of the positions, evenly spread, first and last kept. */
function spreadPositions(positions: number[], max: number): number[] {
  if (positions.length <= max) return positions;
  if (max === 1) return [positions[positions.length >> 1]];
  const out: number[] = [];
  for (let i = 0; i < max; i++) out.push(positions[Math.round((i * (positions.length - 1)) / (max - 1))]);
  return out;
}

function median(values: number[]): number {
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
