// The one set of tunable numbers of the acoustic engine, with units in every
// name, and the validation that turns a bad value into a sentence naming it.
// Everything else in lib/audio receives an already-validated AnalysisOptions.

export const ANALYSIS_DEFAULTS = Object.freeze({
  // Frames of about 20 ms resolve the 2–10 kHz band into bins of ~50 Hz while
  // staying short against a 200 ms onset window; the size is rounded to a
  // power of two because fft.js only transforms those.
  frameTargetMs: 20,
  // The level envelope advances in 5 ms hops so a stroke start is placed to
  // within one hop, well inside a ±10 ms budget.
  hopMs: 5,
  // Length of the sliding level window over the hops; 20 ms smooths the
  // hop-to-hop scatter of noise without smearing a start by more than a hop.
  levelWindowMs: 20,

  // Noise floor: this percentile of the windowed level over the lead-in (or,
  // without one, over the whole recording) — low enough to land in the pauses
  // between strokes, high enough to ignore a dropout.
  noiseFloorPercentile: 20,
  // Length of the quiet room-sound lead-in, 0 when there is none (files).
  leadInMs: 0,
  // Live analyzer: length of the room-sound calibration when none was asked
  // for explicitly (the bench screen records two seconds of quiet first).
  calibrationMs: 2000,
  // Digital silence has no level; clamp the floor so thresholds stay finite.
  minNoiseFloorDbfs: -100,
  // A calibration made entirely over a sound (lapping begun before "stay
  // quiet") measures that sound as the room. When the level then stays this
  // far below the measured floor this long, between strokes, the room was
  // quieter than measured: the analyzer measures it again.
  floorDropDb: 6,
  floorDropMs: 500,
  // The level envelope that finds strokes is measured above this frequency
  // (a second-order Butterworth high-pass): compressor rumble, mains hum and
  // most of a voice's energy lie below it, lapping noise mostly above.
  levelBandLowHz: 2000,
  // Band noise floors (grind band, voice band) come from frames whose hops
  // all lie within this margin of the level floor: the quiet part of a
  // calibration, or the pauses of a file.
  quietMarginDb: 3,
  // At most this many quiet frames are measured for the band floors of a
  // file without a lead-in.
  floorFramesMax: 128,

  // Hysteresis: a stroke begins when the level rises this far above the floor
  // and lasts while it stays above the lower exit level.
  strokeStartAboveFloorDb: 10,
  strokeEndAboveFloorDb: 6,
  // A lift: the level must stay below the exit level this long before a
  // stroke counts as ended; shorter dips are the reversal of a back-and-forth.
  // Kept short because the bench screen shows a stroke only once it has ended.
  minLiftMs: 100,
  // A stroke that starts under a quieter sound's tail (talk, a running tool)
  // never drops to the floor first. While a burst sounds, its level is
  // tracked in dB with this time constant (following every rise at once over
  // its first levelWindowMs + splitHoldMs, while the sound comes up); a rise
  // of splitRiseDb above the track that holds splitHoldMs starts a new burst
  // where the rise began. Lapping's own swing and reversals stay well inside
  // this, and a knock is over before the hold.
  levelTrackMs: 500,
  splitRiseDb: 9,
  splitHoldMs: 60,
  minStrokeMs: 300,
  // Longer continuous sound is machinery or a running tap, not one stroke.
  maxStrokeMs: 10_000,

  // The band where the grinding burst lives.
  highBandLowHz: 2000,
  highBandHighHz: 10_000,
  // Upper band edge never closer to Nyquist than this fraction of the sample
  // rate, where anti-alias filters already roll off.
  highBandMaxFractionOfRate: 0.45,
  onsetWindowMs: 200,
  // The body is steady noise, so this many frames of it (about 0.35 s at
  // 48 kHz) pin its mean to about ±0.1 dB; more would only cost time on long
  // strokes.
  maxBodyFrames: 16,
  // The body of a stroke is its middle half.
  bodyStartFraction: 0.25,
  bodyEndFraction: 0.75,

  // Spectral shape test. Lapping is broadband noise, so its spectrum is flat
  // across this band; voiced speech and a ringing tool concentrate their
  // energy in a few harmonics or partials.
  shapeBandLowHz: 300,
  shapeBandHighHz: 8000,
  // Median spectral flatness (geometric / arithmetic mean of the amplitude
  // spectrum) a sound must reach to count as lapping. White noise gives about
  // 0.85 (a Rayleigh amplitude distribution), a pure tone close to 0.
  minFlatness: 0.45,
  // How many frames of a candidate are inspected for its shape.
  shapeFramesPerStroke: 12,

  // Quality, judged where we measure: the body's grind-band power, less the
  // calibrated grind-band noise, must be this far above that noise. Below
  // it the noise subtraction leans too hard on the floor estimate.
  minBandSnrDb: 8,

  // Talk over a stroke. The voice band holds a voice's low harmonics and
  // first formant, above most compressor rumble; lapping noise puts little
  // there. A frame counts as voiced when its voice-band power, less the
  // calibrated voice-band noise (so steady hum does not count), stands
  // voiceOverNoiseDb above that noise (so a swelling compressor does not)
  // and exceeds either voiceOverGrindMaxDb above the body's grind-band power
  // (no lapping sound is tilted that far) or voiceOverReferenceDb above what
  // this session's clean strokes put there.
  voiceBandLowHz: 300,
  voiceBandHighHz: 1000,
  voiceOverNoiseDb: 8,
  voiceOverGrindMaxDb: 10,
  voiceOverReferenceDb: 6,
  // Voiced frames among a stroke's measured frames that flag it (a syllable
  // covers several; a compressor's swell now and then one or two).
  voiceMinFrames: 4,
  // A voiced burst less flat than this is talk, not a stroke with talk over
  // it: lapping under a voice measured 0.77–0.8, espeak-ng speech alone
  // 0.1–0.56 (synthetic sessions of the tests).
  minFlatnessWithVoice: 0.7,
  // A stroke starting this soon after a sound rejected as speech is flagged
  // too: a fricative can open a stroke while the vowel before it was apart.
  speechGuardMs: 300,
  // Knocks and rattles over a stroke: a hop whose level-band power is this
  // far above the median of its neighbours within the stroke is a spike;
  // this many spikes flag the stroke. The onset burst rises and decays over
  // tens of milliseconds, so it never spikes against its neighbours.
  impulseSpikeDb: 4,
  impulseNeighbourHops: 5,
  // A hop's kurtosis in the level band: about 3 for noise like lapping's
  // (Gaussian), higher where sharp clicks sit inside it.
  impulseKurtosis: 5,
  impulseMinSpikes: 3,
  // Clipping: this many consecutive samples at or beyond this fraction of full
  // scale (8-bit PCM peaks at 127/128, so 0.99 still catches it).
  clipLevel: 0.99,
  clipRunSamples: 3,

  // Settled rule.
  settledStrokes: 4,
  settledMaxContrastDb: 1.5,
  settledMaxSlopeDbPerStroke: 0.3,
  // Not-settling rule: only after this many strokes, judged on the slope of
  // the last notSettlingSlopeStrokes strokes.
  notSettlingMinStrokes: 12,
  notSettlingSlopeStrokes: 6,
  // Fade fit needs this many strokes; the remaining-strokes estimate looks at
  // most this far ahead.
  fitMinStrokes: 3,
  remainingHorizonStrokes: 200,
  // The strokes-remaining forecast is shown only when the forecasts made at
  // the last forecastStableStrokes judged strokes agree on the stroke the
  // seat settles at to within this fraction of what remains (or one stroke).
  forecastStableStrokes: 3,
  forecastStableFraction: 0.3,
});

export type AnalysisOptions = { readonly [K in keyof typeof ANALYSIS_DEFAULTS]: number };
export type AnalysisOptionsInput = Partial<AnalysisOptions>;

export class OptionsError extends Error {
  override name = "OptionsError";
}

interface Bound {
  min: number;
  max: number;
  minExclusive?: boolean;
  integer?: boolean;
}

const BOUNDS: { readonly [K in keyof AnalysisOptions]: Bound } = {
  frameTargetMs: { min: 5, max: 100 },
  hopMs: { min: 0.5, max: 5 },
  levelWindowMs: { min: 1, max: 100 },
  noiseFloorPercentile: { min: 0, max: 100 },
  leadInMs: { min: 0, max: 60_000 },
  calibrationMs: { min: 100, max: 60_000 },
  minNoiseFloorDbfs: { min: -200, max: -20 },
  floorDropDb: { min: 0, max: 80, minExclusive: true },
  floorDropMs: { min: 10, max: 60_000 },
  levelBandLowHz: { min: 0, max: 20_000 },
  quietMarginDb: { min: 0, max: 40 },
  floorFramesMax: { min: 1, max: 10_000, integer: true },
  strokeStartAboveFloorDb: { min: 0, max: 80, minExclusive: true },
  strokeEndAboveFloorDb: { min: 0, max: 80, minExclusive: true },
  minLiftMs: { min: 0, max: 5000 },
  levelTrackMs: { min: 10, max: 60_000 },
  splitRiseDb: { min: 0, max: 80, minExclusive: true },
  splitHoldMs: { min: 0, max: 5000 },
  minStrokeMs: { min: 0, max: 60_000 },
  maxStrokeMs: { min: 10, max: 120_000 },
  highBandLowHz: { min: 20, max: 48_000 },
  highBandHighHz: { min: 20, max: 48_000 },
  highBandMaxFractionOfRate: { min: 0.1, max: 0.5 },
  onsetWindowMs: { min: 10, max: 5000 },
  maxBodyFrames: { min: 1, max: 10_000, integer: true },
  bodyStartFraction: { min: 0, max: 1 },
  bodyEndFraction: { min: 0, max: 1 },
  shapeBandLowHz: { min: 0, max: 48_000 },
  shapeBandHighHz: { min: 20, max: 48_000 },
  minFlatness: { min: 0, max: 1 },
  shapeFramesPerStroke: { min: 1, max: 1000, integer: true },
  minBandSnrDb: { min: -20, max: 80 },
  voiceBandLowHz: { min: 20, max: 20_000 },
  voiceBandHighHz: { min: 20, max: 20_000 },
  voiceOverNoiseDb: { min: 0, max: 80 },
  voiceOverGrindMaxDb: { min: -40, max: 80 },
  voiceOverReferenceDb: { min: 0, max: 80 },
  voiceMinFrames: { min: 1, max: 1000, integer: true },
  minFlatnessWithVoice: { min: 0, max: 1 },
  speechGuardMs: { min: 0, max: 10_000 },
  impulseSpikeDb: { min: 1, max: 80 },
  impulseNeighbourHops: { min: 2, max: 100, integer: true },
  impulseKurtosis: { min: 3, max: 1000 },
  impulseMinSpikes: { min: 1, max: 10_000, integer: true },
  clipLevel: { min: 0.5, max: 1, minExclusive: false },
  clipRunSamples: { min: 1, max: 1000, integer: true },
  settledStrokes: { min: 2, max: 100, integer: true },
  settledMaxContrastDb: { min: -20, max: 40 },
  settledMaxSlopeDbPerStroke: { min: 0, max: 10 },
  notSettlingMinStrokes: { min: 2, max: 10_000, integer: true },
  notSettlingSlopeStrokes: { min: 2, max: 1000, integer: true },
  fitMinStrokes: { min: 3, max: 1000, integer: true },
  remainingHorizonStrokes: { min: 1, max: 100_000, integer: true },
  forecastStableStrokes: { min: 1, max: 100, integer: true },
  forecastStableFraction: { min: 0, max: 10 },
};

function fail(message: string): never {
  throw new OptionsError(message);
}

/** Merge options over the defaults, rejecting unknown names and bad values. */
export function resolveOptions(input: unknown = {}): AnalysisOptions {
  if (input === null || typeof input !== "object" || Array.isArray(input)) {
    fail(`analysis options must be an object, got ${describe(input)}`);
  }
  const merged: Record<string, number> = { ...ANALYSIS_DEFAULTS };
  for (const [key, value] of Object.entries(input as Record<string, unknown>)) {
    if (!(key in BOUNDS)) {
      fail(`unknown analysis option "${key}" (known: ${Object.keys(BOUNDS).join(", ")})`);
    }
    if (value === undefined) continue;
    const bound = BOUNDS[key as keyof AnalysisOptions];
    if (typeof value !== "number" || !Number.isFinite(value)) {
      fail(`${key} must be a finite number, got ${describe(value)}`);
    }
    const belowMin = bound.minExclusive ? value <= bound.min : value < bound.min;
    if (belowMin || value > bound.max) {
      const lo = bound.minExclusive ? `(${bound.min}` : `[${bound.min}`;
      fail(`${key} must be in ${lo}, ${bound.max}], got ${value}`);
    }
    if (bound.integer && !Number.isInteger(value)) {
      fail(`${key} must be a whole number, got ${value}`);
    }
    merged[key] = value;
  }
  const o = merged as AnalysisOptions;
  if (o.strokeEndAboveFloorDb > o.strokeStartAboveFloorDb) {
    fail(
      `strokeEndAboveFloorDb (${o.strokeEndAboveFloorDb}) must not exceed strokeStartAboveFloorDb (${o.strokeStartAboveFloorDb})`,
    );
  }
  if (o.highBandLowHz >= o.highBandHighHz) {
    fail(`highBandLowHz (${o.highBandLowHz}) must be below highBandHighHz (${o.highBandHighHz})`);
  }
  if (o.shapeBandLowHz >= o.shapeBandHighHz) {
    fail(`shapeBandLowHz (${o.shapeBandLowHz}) must be below shapeBandHighHz (${o.shapeBandHighHz})`);
  }
  if (o.voiceBandLowHz >= o.voiceBandHighHz) {
    fail(`voiceBandLowHz (${o.voiceBandLowHz}) must be below voiceBandHighHz (${o.voiceBandHighHz})`);
  }
  if (o.bodyStartFraction >= o.bodyEndFraction) {
    fail(`bodyStartFraction (${o.bodyStartFraction}) must be below bodyEndFraction (${o.bodyEndFraction})`);
  }
  if (o.minStrokeMs >= o.maxStrokeMs) {
    fail(`minStrokeMs (${o.minStrokeMs}) must be below maxStrokeMs (${o.maxStrokeMs})`);
  }
  return Object.freeze({ ...o });
}

export const MIN_SAMPLE_RATE_HZ = 16_000;
export const MAX_SAMPLE_RATE_HZ = 96_000;

export function validateSampleRate(sampleRateHz: unknown): number {
  if (typeof sampleRateHz !== "number" || !Number.isInteger(sampleRateHz)) {
    fail(`sample rate must be a whole number of hertz, got ${describe(sampleRateHz)}`);
  }
  if (sampleRateHz < MIN_SAMPLE_RATE_HZ || sampleRateHz > MAX_SAMPLE_RATE_HZ) {
    fail(
      `sample rate ${sampleRateHz} Hz is outside the supported ${MIN_SAMPLE_RATE_HZ}–${MAX_SAMPLE_RATE_HZ} Hz`,
    );
  }
  return sampleRateHz;
}

function describe(value: unknown): string {
  if (typeof value === "string") return JSON.stringify(value);
  if (typeof value === "number") return String(value);
  if (value === null) return "null";
  if (Array.isArray(value)) return "an array";
  return typeof value;
}
