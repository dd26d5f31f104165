// Per-frame features computed from a spectrum we already have: meyda's
// extractors fed our fft.js amplitude spectrum (so meyda never runs its own,
// slower FFT), plus band power and spectral flux, which are ours.

import Meyda from "meyda";

interface MeydaSpectralExtractors {
  spectralCentroid(args: { ampSpectrum: Float32Array }): number;
  spectralFlatness(args: { ampSpectrum: Float32Array }): number;
  spectralRolloff(args: { ampSpectrum: Float32Array; sampleRate: number }): number;
}

const extractors = (Meyda as unknown as { featureExtractors: MeydaSpectralExtractors }).featureExtractors;

/**
 * Spectral centroid in Hz. meyda returns bin units; silence gives NaN, which
 * is returned as NaN for the caller to treat as "no sound".
 */
export function spectralCentroidHz(amplitude: Float32Array, sampleRateHz: number, frameSize: number): number {
  const bin = extractors.spectralCentroid({ ampSpectrum: amplitude });
  return (bin * sampleRateHz) / frameSize;
}

/** Geometric over arithmetic mean of the amplitudes: ~0.85 for white noise, →0 for a tone; NaN for silence. */
export function spectralFlatness(amplitude: Float32Array): number {
  return extractors.spectralFlatness({ ampSpectrum: amplitude });
}

/** Frequency below which 99% of the amplitude sum lies (meyda's definition). */
export function spectralRolloffHz(amplitude: Float32Array, sampleRateHz: number): number {
  return extractors.spectralRolloff({ ampSpectrum: amplitude, sampleRate: sampleRateHz });
}

/** Sum of the power bins first..last inclusive: the band's mean-square level. */
export function bandPower(power: Float64Array, first: number, last: number): number {
  let sum = 0;
  for (let k = first; k <= last; k++) sum += power[k];
  return sum;
}

/**
 * Half-wave rectified spectral flux (Dixon, DAFx 2006): only rising bins
 * count, so a sound that starts scores and one that fades does not. Ours
 * because meyda 5.6.3's spectralFlux throws.
 */
export function spectralFlux(previous: Float32Array, current: Float32Array): number {
  if (previous.length !== current.length) {
    throw new RangeError(`spectra differ in length: ${previous.length} vs ${current.length}`);
  }
  let flux = 0;
  for (let k = 0; k < current.length; k++) {
    const d = current[k] - previous[k];
    if (d > 0) flux += d;
  }
  return flux;
}

export function powerToDb(power: number): number {
  return 10 * Math.log10(power);
}
