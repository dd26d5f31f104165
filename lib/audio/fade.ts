// The fade curve: stroke-by-stroke contrast fitted by a decay toward a floor,
//   contrast(k) = floorDb + amplitudeDb * exp(-(k - 1) / decayStrokes),
// by least squares. For a fixed decay the model is linear in floor and
// amplitude, so the fit is a one-dimensional search over the decay with a
// closed-form solve inside — no iterative solver to diverge on a short curve.

export interface FadeFit {
  floorDb: number;
  amplitudeDb: number;
  /** Strokes for the excess over the floor to fall by a factor e. */
  decayStrokes: number;
  /** Root-mean-square residual, dB. */
  rmsErrorDb: number;
  strokes: number;
}

const MIN_DECAY_STROKES = 0.25;
const MAX_DECAY_STROKES = 200;

/** Fitted contrast at stroke number k (1-based). */
export function fadeAt(fit: FadeFit, k: number): number {
  return fit.floorDb + fit.amplitudeDb * Math.exp(-(k - 1) / fit.decayStrokes);
}

interface Solve {
  floor: number;
  amp: number;
  sse: number;
}

// The model's decay terms exp(-i / decay), kept between the two passes of a solve so that each is
// computed once; grown as longer curves come (a fit runs to completion before the next).
let decayTerms = new Float64Array(64);

function solveForDecay(y: ArrayLike<number>, decay: number): Solve {
  const n = y.length;
  if (decayTerms.length < n) decayTerms = new Float64Array(Math.max(n, decayTerms.length * 2));
  const terms = decayTerms;
  let se = 0;
  let see = 0;
  let sy = 0;
  let sey = 0;
  // exp(-i / decay) as the i-th power of exp(-1 / decay): one exp per solve instead of one per
  // stroke. The product drifts from the direct value by about i rounding steps (below 1e-13
  // relative over a thousand strokes), far under the figures' own resolution.
  const ratio = Math.exp(-1 / decay);
  let e = 1;
  for (let i = 0; i < n; i++, e *= ratio) {
    terms[i] = e;
    se += e;
    see += e * e;
    sy += y[i];
    sey += e * y[i];
  }
  const det = n * see - se * se;
  let floor: number;
  let amp: number;
  if (Math.abs(det) < 1e-12) {
    floor = sy / n;
    amp = 0;
  } else {
    amp = (n * sey - se * sy) / det;
    floor = (sy - amp * se) / n;
  }
  // A curve that rises is not a fade; the best non-rising model is flat.
  if (amp < 0) {
    amp = 0;
    floor = sy / n;
  }
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - (floor + amp * terms[i]);
    sse += r * r;
  }
  return { floor, amp, sse };
}

/** Least-squares fade fit, or null with fewer than minStrokes values. */
export function fitFade(contrastsDb: ArrayLike<number>, minStrokes = 3): FadeFit | null {
  const n = contrastsDb.length;
  if (n < Math.max(3, minStrokes)) return null;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(contrastsDb[i])) throw new RangeError(`contrast of stroke ${i + 1} is not a finite number: ${contrastsDb[i]}`);
  }
  const lo = Math.log(MIN_DECAY_STROKES);
  const hi = Math.log(MAX_DECAY_STROKES);
  const steps = 60;
  let bestT = lo;
  let best = solveForDecay(contrastsDb, Math.exp(lo));
  for (let s = 1; s <= steps; s++) {
    const t = lo + ((hi - lo) * s) / steps;
    const r = solveForDecay(contrastsDb, Math.exp(t));
    if (r.sse < best.sse) {
      best = r;
      bestT = t;
    }
  }
  // Golden-section refinement within one grid step either side.
  const step = (hi - lo) / steps;
  let a = Math.max(lo, bestT - step);
  let b = Math.min(hi, bestT + step);
  // Each step keeps one of its two inner points as an inner point of the next, so one new solve
  // per step.
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = solveForDecay(contrastsDb, Math.exp(c)).sse;
  let fd = solveForDecay(contrastsDb, Math.exp(d)).sse;
  for (let it = 0; it < 40; it++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = solveForDecay(contrastsDb, Math.exp(c)).sse;
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = solveForDecay(contrastsDb, Math.exp(d)).sse;
    }
  }
  const tMid = (a + b) / 2;
  const refined = solveForDecay(contrastsDb, Math.exp(tMid));
  if (refined.sse <= best.sse) {
    best = refined;
    bestT = tMid;
  }
  return {
    floorDb: best.floor,
    amplitudeDb: best.amp,
    decayStrokes: Math.exp(bestT),
    rmsErrorDb: Math.sqrt(best.sse / n),
    strokes: n,
  };
}
