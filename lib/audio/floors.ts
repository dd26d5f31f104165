// Noise floors per band. The level floor (of the level band's envelope)
// places stroke starts and ends; the grind-band floor is what the onset
// contrast and the stroke's band signal-to-noise ratio are measured against
// (its power is subtracted from onset and body before the contrast); the
// voice-band floor lets steady hum and rumble stand apart from a voice.
// Band floors come from spectra of quiet frames only: frames every one of
// whose hops lies within quietMarginDb of the level floor — the quiet part of
// a calibration, or the pauses of a file — so a sound during "stay quiet"
// does not raise them.

import { measureFrame, type StrokeBands } from "./contrast";
import type { SpectrumFrame } from "./frames";
import type { AnalysisOptions } from "./options";

export interface NoiseFloors {
  /** Level band (the high-passed envelope), dBFS. */
  levelDbfs: number;
  /** Grind (high) band power, dB re full scale, as onsetDb and bodyDb. */
  grindDbfs: number;
  /** Voice band power, dB re full scale. */
  voiceDbfs: number;
}

/** One frame measured for the band floors. */
export interface FloorFrame {
  /** Absolute position of its first sample. */
  at: number;
  grindPower: number;
  voicePower: number;
}

/** Frame positions on a whole-frame grid from `start` that end by `end`. */
export function floorGrid(start: number, end: number, frameSize: number): number[] {
  const out: number[] = [];
  for (let at = start; at + frameSize <= end; at += frameSize) out.push(at);
  return out;
}

/** Linear power of a dB value, clamped to the engine's lowest floor. */
export function dbToPower(db: number, options: AnalysisOptions): number {
  return 10 ** (Math.max(db, options.minNoiseFloorDbfs) / 10);
}

/**
 * Is the frame at `at` quiet: every hop it touches at most quietMarginDb
 * above the level floor? `hopPowers[h - hopBase]` is hop h's own power.
 */
export function isQuietFrame(
  at: number,
  frameSize: number,
  hopSize: number,
  hopPowers: ArrayLike<number>,
  hopBase: number,
  levelFloorDbfs: number,
  options: AnalysisOptions,
): boolean {
  const limit = dbToPower(levelFloorDbfs + options.quietMarginDb, options);
  const first = Math.floor(at / hopSize);
  const last = Math.floor((at + frameSize - 1) / hopSize);
  for (let h = first; h <= last; h++) {
    const i = h - hopBase;
    if (i < 0 || i >= hopPowers.length || !(hopPowers[i] <= limit)) return false;
  }
  return true;
}

export function measureFloorFrame(samples: Float32Array, at: number, absoluteAt: number, frame: SpectrumFrame, bands: StrokeBands): FloorFrame {
  const m = measureFrame(samples, at, frame, bands, false);
  return { at: absoluteAt, grindPower: m.power, voicePower: m.voicePower };
}

/**
 * Band floors from measured frames: the mean power of the quiet ones (a
 * mean, since it is subtracted as the expected noise power); with none
 * quiet, the quietest frame by grind power; with no frame at all, the level
 * floor stands in for both (the level band holds the grind band).
 */
export function bandFloors(levelFloorDbfs: number, frames: readonly FloorFrame[], quiet: readonly boolean[], options: AnalysisOptions): NoiseFloors {
  let grind = 0;
  let voice = 0;
  let count = 0;
  for (let i = 0; i < frames.length; i++) {
    if (!quiet[i]) continue;
    grind += frames[i].grindPower;
    voice += frames[i].voicePower;
    count++;
  }
  if (count === 0 && frames.length > 0) {
    let best = frames[0];
    for (const f of frames) if (f.grindPower < best.grindPower) best = f;
    grind = best.grindPower;
    voice = best.voicePower;
    count = 1;
  }
  const toDb = (p: number) => {
    const db = 10 * Math.log10(p);
    return Number.isFinite(db) ? Math.max(db, options.minNoiseFloorDbfs) : options.minNoiseFloorDbfs;
  };
  if (count === 0) return { levelDbfs: levelFloorDbfs, grindDbfs: levelFloorDbfs, voiceDbfs: options.minNoiseFloorDbfs };
  return { levelDbfs: levelFloorDbfs, grindDbfs: toDb(grind / count), voiceDbfs: toDb(voice / count) };
}

/** Did something louder than a stroke's start threshold sound during the calibration hops? */
export function calibrationDisturbed(levels: ArrayLike<number>, from: number, to: number, levelFloorDbfs: number, options: AnalysisOptions): boolean {
  const limit = dbToPower(levelFloorDbfs + options.strokeStartAboveFloorDb, options);
  for (let h = from; h < to; h++) if (levels[h] >= limit) return true;
  return false;
}

/**
 * Up to floorFramesMax quiet frames of a whole recording (no lead-in): grid
 * positions whose hops are all quiet, spread evenly; a recording with no
 * quiet frame at all gives its 16 quietest (by their loudest hop).
 */
export function pauseFramePositions(
  totalSamples: number,
  frameSize: number,
  hopSize: number,
  hopPowers: ArrayLike<number>,
  levelFloorDbfs: number,
  options: AnalysisOptions,
): number[] {
  const limit = dbToPower(levelFloorDbfs + options.quietMarginDb, options);
  // Loudest hop under each grid frame, in one pass over the hops.
  const grid = floorGrid(0, totalSamples, frameSize);
  const loudest = grid.map((at) => {
    let m = 0;
    const last = Math.min(hopPowers.length - 1, Math.floor((at + frameSize - 1) / hopSize));
    for (let h = Math.floor(at / hopSize); h <= last; h++) if (hopPowers[h] > m) m = hopPowers[h];
    return last < Math.floor((at + frameSize - 1) / hopSize) ? Infinity : m;
  });
  const quiet = grid.filter((_, i) => loudest[i] <= limit);
  const max = options.floorFramesMax;
  if (quiet.length === 0) {
    // No quiet frame at all: the quietest few, by their loudest hop.
    return grid
      .map((at, i) => ({ at, loud: loudest[i] }))
      .sort((a, b) => a.loud - b.loud || a.at - b.at)
      .slice(0, Math.min(16, max))
      .map((f) => f.at)
      .sort((a, b) => a - b);
  }
  if (quiet.length <= max) return quiet;
  const out: number[] = [];
  for (let i = 0; i < max; i++) out.push(quiet[Math.floor(((i + 0.5) * quiet.length) / max)]);
  return out;
}
