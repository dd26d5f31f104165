// Onset contrast of one stroke: how much louder the high band is during the
// first onsetWindowMs than over the body (the middle half). A fresh seat
// starts each stroke with a gritty burst; a lapped one sounds the same from
// start to finish, and the contrast falls to about 0 dB.

import { bandBins, type SpectrumFrame } from "./frames";
import { bandPower } from "./features";
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
 * Mean power of bins first..last over [start, end) of `samples`: Hann frames
 * at half-frame hops, which weight every inner sample equally (the periodic
 * Hann window overlap-adds to a constant). A region shorter than a frame gets
 * one frame centred on it.
 */
export function meanBandPower(
  samples: Float32Array,
  start: number,
  end: number,
  frame: SpectrumFrame,
  first: number,
  last: number,
): number {
  const n = frame.size;
  const hop = n >> 1;
  let sum = 0;
  let frames = 0;
  for (let at = start; at + n <= end; at += hop) {
    frame.analyze(samples, at);
    sum += bandPower(frame.power, first, last);
    frames++;
  }
  if (frames === 0) {
    frame.analyze(samples, Math.max(0, Math.floor((start + end - n) / 2)));
    return bandPower(frame.power, first, last);
  }
  return sum / frames;
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
  const [lowHz, highHz] = highBandHz(sampleRateHz, options);
  const [first, last] = bandBins(sampleRateHz, frame.size, lowHz, highHz);
  const length = end - start;
  const onsetEnd = Math.min(end, start + Math.round((sampleRateHz * options.onsetWindowMs) / 1000));
  const bodyStart = start + Math.round(length * options.bodyStartFraction);
  const bodyEnd = start + Math.round(length * options.bodyEndFraction);
  const onset = meanBandPower(samples, start, onsetEnd, frame, first, last);
  const body = meanBandPower(samples, bodyStart, bodyEnd, frame, first, last);
  const onsetDb = 10 * Math.log10(onset);
  const bodyDb = 10 * Math.log10(body);
  return { onsetDb, bodyDb, contrastDb: onsetDb - bodyDb };
}

/** Mean square of samples[start, end) in dBFS (time domain; full-band level). */
export function meanSquareDb(samples: Float32Array, start: number, end: number): number {
  let s = 0;
  for (let i = start; i < end; i++) s += samples[i] * samples[i];
  return 10 * Math.log10(s / Math.max(1, end - start));
}
