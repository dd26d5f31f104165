// Synthetic lapping sessions with known answers, for tests, the benchmark and
// demo data: strokes of broadband noise, each starting with a high-frequency
// grinding burst sized to give a chosen onset contrast, separated by lifts,
// over room noise and mains hum; optionally speech, a dropped tool's ring and
// a tap in the pauses. Deterministic for a given seed.

import { highBandHz } from "./contrast";
import { butterworthHighPass, butterworthLowPass, filterInPlace } from "./level";
import { resolveOptions, type AnalysisOptionsInput } from "./options";

export interface SynthStrokeSpec {
  /** Onset contrast the stroke is built to have, dB. */
  contrastDb: number;
  durationS?: number;
  /** Pause after the stroke (the lift and turn), s. */
  gapS?: number;
  /** Full-band body level, dBFS. */
  levelDbfs?: number;
}

export type SynthEvent =
  | { kind: "tap"; atS: number; levelDbfs?: number }
  | { kind: "ring"; atS: number; levelDbfs?: number; decayS?: number }
  | { kind: "speech"; atS: number; samples: Float32Array; levelDbfs?: number }
  /** An impact wrench in the next bay: a train of hammer blows, each a sharp broadband knock with a short ring. */
  | { kind: "rattle"; atS: number; durationS: number; rateHz?: number; levelDbfs?: number };

export interface SynthSessionSpec {
  sampleRate: number;
  strokes: SynthStrokeSpec[];
  seed?: number;
  /** Quiet room sound before the first stroke, s. */
  leadInS?: number;
  tailS?: number;
  roomNoiseDbfs?: number;
  humHz?: number;
  humDbfs?: number;
  /** Harmonics of the hum, the fundamental included (3 by default), each half the one before. */
  humHarmonics?: number;
  /** Compressor rumble: noise below cutoffHz, swelling with the compressor's cycle. */
  rumble?: { levelDbfs: number; cutoffHz?: number; cycleHz?: number };
  /** Steady noise in a band only (a fan, a hiss), for noise that sits where we measure. */
  hiss?: { levelDbfs: number; lowHz: number; highHz: number };
  /** Amplitude time constant of the grinding burst, s. */
  burstDecayS?: number;
  /** Depth of the back-and-forth level swing within a stroke, dB. */
  swingDb?: number;
  events?: SynthEvent[];
  /** Multiply everything by this (above 1 drives it into clipping at ±1). */
  gain?: number;
  /** Options whose band and windows define the contrast being built. */
  options?: AnalysisOptionsInput;
}

export interface SynthStrokeTruth {
  startS: number;
  endS: number;
  /** Expected contrast from the generating powers, by the engine's definition. */
  contrastDb: number;
}

export interface SynthSession {
  sampleRate: number;
  samples: Float32Array;
  strokes: SynthStrokeTruth[];
}

/** mulberry32: small, fast, good enough for test noise, and seedable. */
export function createRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const db = (x: number) => 10 ** (x / 20);
// Uniform noise on [-1, 1) has variance 1/3; scale by sqrt(3) for unit variance.
const UNIT = Math.sqrt(3);

/** Band fraction of the power of white noise. */
function whiteBandFraction(lo: number, hi: number, fs: number): number {
  return (hi - lo) / (fs / 2);
}

/** Band fraction for y[n] = (u[n] - u[n-1]) / 2 with unit-variance white u (total power 1/2). */
function diffBandPower(lo: number, hi: number, fs: number): number {
  const integral = (hi - lo) / 2 - (fs / (4 * Math.PI)) * (Math.sin((2 * Math.PI * hi) / fs) - Math.sin((2 * Math.PI * lo) / fs));
  return integral / (fs / 2);
}

/** Ten-millisecond raised-cosine ramps keep stroke edges from clicking. */
function edgeRamp(i: number, n: number, ramp: number): number {
  if (i < ramp) return 0.5 - 0.5 * Math.cos((Math.PI * i) / ramp);
  if (i >= n - ramp) return 0.5 - 0.5 * Math.cos((Math.PI * (n - 1 - i)) / ramp);
  return 1;
}

export function synthesizeSession(spec: SynthSessionSpec): SynthSession {
  const fs = spec.sampleRate;
  const o = resolveOptions(spec.options ?? {});
  const rand = createRandom(spec.seed ?? 1);
  const leadIn = spec.leadInS ?? 2;
  const tail = spec.tailS ?? 1;
  const plan = spec.strokes.map((s) => ({
    durationS: s.durationS ?? 0.8 + 0.8 * rand(),
    gapS: s.gapS ?? 0.6 + 0.6 * rand(),
    levelDbfs: s.levelDbfs ?? -34 + 4 * rand(),
    contrastDb: s.contrastDb,
  }));
  let total = leadIn + tail;
  for (const p of plan) total += p.durationS + p.gapS;
  const n = Math.round(total * fs);
  const out = new Float32Array(n);

  const roomRms = db(spec.roomNoiseDbfs ?? -70);
  const humAmp = db(spec.humDbfs ?? -50) * Math.SQRT2;
  const humHz = spec.humHz ?? 50;
  const harmonics = spec.humHarmonics ?? 3;
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    const w = 2 * Math.PI * humHz * t;
    let hum = Math.sin(w) + 0.5 * Math.sin(2 * w + 0.3) + 0.25 * Math.sin(3 * w + 1.1);
    for (let k = 4; k <= harmonics && k * humHz < fs / 2; k++) hum += 0.5 ** (k - 1) * Math.sin(k * w + 0.7 * k);
    out[i] = roomRms * UNIT * (2 * rand() - 1) + humAmp * hum;
  }
  // Shop noise draws from a stream of its own, so sessions without it stay as they were.
  const shopRand = createRandom((spec.seed ?? 1) ^ 0x5bd1e995);
  if (spec.rumble) addBandNoise(out, fs, shopRand, spec.rumble.levelDbfs, 0, spec.rumble.cutoffHz ?? 250, spec.rumble.cycleHz ?? 0.7);
  if (spec.hiss) addBandNoise(out, fs, shopRand, spec.hiss.levelDbfs, spec.hiss.lowHz, spec.hiss.highHz, 0);

  const [lo, hi] = highBandHz(fs, o);
  const rhoWhite = whiteBandFraction(lo, hi, fs);
  const rhoDiff = diffBandPower(lo, hi, fs);
  const tau = spec.burstDecayS ?? 0.12;
  const swingDb = spec.swingDb ?? 1.5;
  const ramp = Math.round(0.01 * fs);
  const truths: SynthStrokeTruth[] = [];
  let at = leadIn;
  for (const p of plan) {
    const start = Math.round(at * fs);
    const len = Math.round(p.durationS * fs);
    const bodyRms = db(p.levelDbfs);
    const swingHz = 2 + rand();
    const phase = 2 * Math.PI * rand();
    const bodyEnv = new Float64Array(len);
    const burstEnv = new Float64Array(len);
    for (let i = 0; i < len; i++) {
      const t = i / fs;
      bodyEnv[i] = bodyRms * edgeRamp(i, len, ramp) * db((swingDb / 2) * Math.sin(2 * Math.PI * swingHz * t + phase));
      burstEnv[i] = Math.exp(-t / tau) * Math.min(1, i / (0.002 * fs)) * edgeRamp(i, len, ramp);
    }
    // Expected high-band power of each part over the onset window and the
    // body, from the envelopes: the burst's size then follows from the
    // wanted contrast in closed form. The contrast is the lapping sound's
    // own, room noise apart: the engine subtracts the noise it calibrated.
    const onsetEnd = Math.min(len, Math.round((fs * o.onsetWindowMs) / 1000));
    const b0 = Math.round(len * o.bodyStartFraction);
    const b1 = Math.round(len * o.bodyEndFraction);
    const mean = (env: Float64Array, from: number, to: number) => {
      let s = 0;
      for (let i = from; i < to; i++) s += env[i] * env[i];
      return s / (to - from);
    };
    const aOn = mean(bodyEnv, 0, onsetEnd) * rhoWhite;
    const aBody = mean(bodyEnv, b0, b1) * rhoWhite;
    const bOn = mean(burstEnv, 0, onsetEnd) * rhoDiff;
    const bBody = mean(burstEnv, b0, b1) * rhoDiff;
    const r = 10 ** (p.contrastDb / 10);
    let burstVar = (r * aBody - aOn) / (bOn - r * bBody);
    if (!Number.isFinite(burstVar) || burstVar < 0) burstVar = 0;
    const burstSd = Math.sqrt(burstVar);
    const truth = 10 * Math.log10((aOn + burstVar * bOn) / (aBody + burstVar * bBody));
    let prevU = 0;
    for (let i = 0; i < len; i++) {
      const u = burstSd * UNIT * (2 * rand() - 1);
      const burst = burstEnv[i] * 0.5 * (u - prevU);
      prevU = u;
      out[start + i] += bodyEnv[i] * UNIT * (2 * rand() - 1) + burst;
    }
    truths.push({ startS: start / fs, endS: (start + len) / fs, contrastDb: truth });
    at += p.durationS + p.gapS;
  }

  for (const ev of spec.events ?? []) {
    if (ev.kind === "rattle") addRattle(out, fs, ev, shopRand);
    else addEvent(out, fs, ev, rand);
  }

  const gain = spec.gain ?? 1;
  for (let i = 0; i < n; i++) {
    const v = out[i] * gain;
    out[i] = v > 1 ? 1 : v < -1 ? -1 : v;
  }
  return { sampleRate: fs, samples: out, strokes: truths };
}

/** Gaussian-ish noise band-limited by Butterworth sections, at a mean-square level, optionally swelling ±3 dB at cycleHz. */
function addBandNoise(out: Float32Array, fs: number, rand: () => number, levelDbfs: number, lowHz: number, highHz: number, cycleHz: number): void {
  const noise = new Float64Array(out.length);
  for (let i = 0; i < noise.length; i++) noise[i] = rand() + rand() + rand() - 1.5;
  if (lowHz > 0) {
    filterInPlace(noise, butterworthHighPass(lowHz, fs));
    filterInPlace(noise, butterworthHighPass(lowHz, fs));
  }
  if (highHz < fs / 2) {
    filterInPlace(noise, butterworthLowPass(highHz, fs));
    filterInPlace(noise, butterworthLowPass(highHz, fs));
  }
  let ss = 0;
  for (const v of noise) ss += v * v;
  const g = db(levelDbfs) / Math.sqrt(ss / Math.max(1, noise.length) || 1);
  for (let i = 0; i < out.length; i++) {
    const swell = cycleHz > 0 ? db(3 * Math.sin((2 * Math.PI * cycleHz * i) / fs)) : 1;
    out[i] += noise[i] * g * swell;
  }
}

function addRattle(out: Float32Array, fs: number, ev: Extract<SynthEvent, { kind: "rattle" }>, rand: () => number): void {
  const peak = db(ev.levelDbfs ?? -14);
  const rate = ev.rateHz ?? 18;
  const blowLen = Math.round(0.012 * fs);
  for (let t = ev.atS; t < ev.atS + ev.durationS; t += (1 / rate) * (0.85 + 0.3 * rand())) {
    const start = Math.round(t * fs);
    const ring = 1500 + 2500 * rand();
    const size = peak * (0.6 + 0.4 * rand());
    for (let i = 0; i < blowLen && start + i < out.length; i++) {
      const s = i / fs;
      out[start + i] += size * (Math.exp(-s / 0.0012) * (2 * rand() - 1) + 0.5 * Math.exp(-s / 0.004) * Math.sin(2 * Math.PI * ring * s));
    }
  }
}

function addEvent(out: Float32Array, fs: number, ev: Exclude<SynthEvent, { kind: "rattle" }>, rand: () => number): void {
  const start = Math.round(ev.atS * fs);
  if (ev.kind === "speech") {
    let ss = 0;
    for (const v of ev.samples) ss += v * v;
    const rms = Math.sqrt(ss / Math.max(1, ev.samples.length)) || 1;
    const g = db(ev.levelDbfs ?? -26) / rms;
    for (let i = 0; i < ev.samples.length && start + i < out.length; i++) out[start + i] += ev.samples[i] * g;
    return;
  }
  if (ev.kind === "tap") {
    // A set-down knock: a few milliseconds of decaying low-mid resonance.
    const amp = db(ev.levelDbfs ?? -12) * Math.SQRT2;
    const len = Math.round(0.06 * fs);
    const f = 900 + 400 * rand();
    for (let i = 0; i < len && start + i < out.length; i++) {
      const t = i / fs;
      out[start + i] += amp * Math.exp(-t / 0.008) * (Math.sin(2 * Math.PI * f * t) + 0.3 * (2 * rand() - 1));
    }
    return;
  }
  // A dropped steel tool: a few inharmonic partials ringing down slowly.
  const amp = db(ev.levelDbfs ?? -20) * Math.SQRT2;
  const decay = ev.decayS ?? 0.5;
  const partials = [1870, 4410, 7290].map((f) => f * (0.97 + 0.06 * rand()));
  const len = Math.round(decay * 6 * fs);
  for (let i = 0; i < len && start + i < out.length; i++) {
    const t = i / fs;
    let v = 0;
    partials.forEach((f, k) => (v += Math.sin(2 * Math.PI * f * t) * Math.exp((-t * (1 + k)) / decay) / (1 + k)));
    out[start + i] += amp * v * Math.min(1, i / (0.001 * fs));
  }
}

/** Contrasts decaying from startDb toward floorDb by factor e every decayStrokes. */
export function decayingContrasts(count: number, startDb: number, floorDb: number, decayStrokes: number): number[] {
  return Array.from({ length: count }, (_, k) => floorDb + (startDb - floorDb) * Math.exp(-k / decayStrokes));
}
