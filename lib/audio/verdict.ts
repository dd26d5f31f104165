// The seat's verdict from its list of stroke contrasts: settled, still
// fading, or not settling. Pure and cheap, so the server recomputes it from
// stored strokes with exactly the code the bench screen runs.

import { fadeAt, fitFade, type FadeFit } from "./fade";
import { resolveOptions, type AnalysisOptions, type AnalysisOptionsInput } from "./options";

/**
 * Reasons a stroke's contrast is not trusted. A flagged stroke keeps its
 * figures for review but never enters the fit or the settled rule.
 */
export const STROKE_FLAGS = ["clipping", "too-quiet", "speech", "impulsive", "start-not-heard", "end-not-heard"] as const;
export type StrokeFlag = (typeof STROKE_FLAGS)[number];

/** Why a stroke was left out, in a technician's words. */
export const FLAG_TEXT: Readonly<Record<StrokeFlag, string>> = Object.freeze({
  clipping: "clipped",
  "too-quiet": "too quiet against the room noise",
  speech: "talk over the stroke",
  impulsive: "a knock or rattle over the stroke",
  "start-not-heard": "its start was not heard",
  "end-not-heard": "listening stopped before it ended",
});

/** The reason for any flag, an unknown one (from an older phone) included. */
export function flagText(flag: string): string {
  return (FLAG_TEXT as Record<string, string>)[flag] ?? (flag === "speech-nearby" ? "talk near the stroke" : flag);
}

/** "3 strokes left out: talk over the stroke (2), clipped (1)", or null when none were. */
export function leftOutSummary(verdict: Pick<SeatVerdict, "leftOutStrokes" | "leftOutByFlag">): string | null {
  const n = verdict.leftOutStrokes;
  if (n === 0) return null;
  const why = Object.entries(verdict.leftOutByFlag)
    .sort((a, b) => (b[1] ?? 0) - (a[1] ?? 0))
    .map(([f, k]) => (n === 1 ? flagText(f) : `${flagText(f)} (${k})`))
    .join(", ");
  return `${n} stroke${n === 1 ? "" : "s"} left out: ${why}`;
}

/** What the verdict needs of a stroke; a full Stroke satisfies it. */
export interface VerdictStroke {
  contrastDb: number;
  /** 1-based stroke number; defaults to the position in the list. */
  index?: number;
  startS?: number;
  flags?: readonly string[];
}

export type SeatState = "no-strokes" | "fading" | "settled" | "not-settling";

export interface SettledRule {
  consecutive: number;
  maxContrastDb: number;
  maxSlopeDbPerStroke: number;
}

export interface SeatVerdict {
  state: SeatState;
  /** Strokes that entered the judgement (flagged ones are left out). */
  judgedStrokes: number;
  /** Strokes left out, and how many carried each flag (a stroke may carry several). */
  leftOutStrokes: number;
  leftOutByFlag: Partial<Record<string, number>>;
  fit: FadeFit | null;
  /**
   * Further strokes the fitted curve needs to satisfy the rule; 0 once
   * settled; null when it never will, and while the forecast is not stable.
   */
  strokesRemaining: number | null;
  /** True when strokesRemaining is a forecast to show: the last forecasts agree. */
  forecastStable: boolean;
  settled: { atStroke: number; atS: number | null } | null;
  notSettling: boolean;
  rule: SettledRule;
}

/** Least-squares slope of values[from..to) against their position, per step. */
export function leastSquaresSlope(values: ArrayLike<number>, from: number, to: number): number {
  const n = to - from;
  if (n < 2) return 0;
  const mx = (n - 1) / 2;
  let my = 0;
  for (let i = from; i < to; i++) my += values[i];
  my /= n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    const dx = i - mx;
    sxy += dx * (values[from + i] - my);
    sxx += dx * dx;
  }
  return sxy / sxx;
}

/** Does the settled rule hold for the window ending just before `end`? */
export function ruleHoldsAt(values: ArrayLike<number>, end: number, options: AnalysisOptions): boolean {
  const n = options.settledStrokes;
  if (end < n) return false;
  for (let i = end - n; i < end; i++) if (!(values[i] <= options.settledMaxContrastDb)) return false;
  return Math.abs(leastSquaresSlope(values, end - n, end)) <= options.settledMaxSlopeDbPerStroke;
}

/** 0-based position of the first stroke at which the rule holds, or -1. */
export function firstSettledPosition(contrastsDb: ArrayLike<number>, options: AnalysisOptions): number {
  for (let end = options.settledStrokes; end <= contrastsDb.length; end++) {
    if (ruleHoldsAt(contrastsDb, end, options)) return end - 1;
  }
  return -1;
}

/**
 * How many more strokes until the rule holds, continuing the observed curve
 * with the fitted one; null if not within the horizon.
 */
export function strokesRemaining(contrastsDb: ArrayLike<number>, fit: FadeFit, options: AnalysisOptions): number | null {
  const n = contrastsDb.length;
  const horizon = options.remainingHorizonStrokes;
  const values = new Float64Array(n + horizon);
  for (let i = 0; i < n; i++) values[i] = contrastsDb[i];
  for (let i = n; i < n + horizon; i++) values[i] = fadeAt(fit, i + 1);
  for (let end = Math.max(n + 1, options.settledStrokes); end <= n + horizon; end++) {
    if (ruleHoldsAt(values, end, options)) return end - n;
  }
  return null;
}

/**
 * Is the forecast made at the last of `contrastsDb` one to show? The
 * forecasts made at each of the last forecastStableStrokes strokes must name
 * the same settling stroke to within forecastStableFraction of what remains
 * (at least one stroke), and the one before the last must be within a factor
 * of two of the last, so two forecasts in a row never contradict each other.
 */
export function forecastIsStable(contrastsDb: readonly number[], remaining: number | null, options: AnalysisOptions): boolean {
  if (remaining === null) return false;
  const n = contrastsDb.length;
  const k = options.forecastStableStrokes;
  if (n < options.fitMinStrokes + k - 1) return false;
  const target = n + remaining;
  const tolerance = Math.max(1, options.forecastStableFraction * remaining);
  for (let back = 1; back < k; back++) {
    const prefix = contrastsDb.slice(0, n - back);
    const fit = fitFade(prefix, options.fitMinStrokes);
    const earlier = fit ? strokesRemaining(prefix, fit, options) : null;
    if (earlier === null) return false;
    if (Math.abs(prefix.length + earlier - target) > tolerance) return false;
    if (back === 1 && (earlier > 2 * Math.max(1, remaining) || remaining > 2 * Math.max(1, earlier))) return false;
  }
  return true;
}

/** Verdict for one seat and stage from its strokes in order. */
export function judgeSeat(
  strokes: readonly VerdictStroke[],
  options: AnalysisOptionsInput | AnalysisOptions = {},
): SeatVerdict {
  const o = resolveOptions(options);
  const judged: VerdictStroke[] = [];
  const leftOutByFlag: Partial<Record<string, number>> = {};
  for (const s of strokes) {
    const flags = s.flags ?? [];
    if (flags.length === 0) judged.push(s);
    for (const f of flags) leftOutByFlag[f] = (leftOutByFlag[f] ?? 0) + 1;
  }
  judged.forEach((s, i) => {
    if (typeof s.contrastDb !== "number" || !Number.isFinite(s.contrastDb)) {
      throw new RangeError(`stroke ${s.index ?? i + 1} has no finite contrastDb (got ${String(s.contrastDb)})`);
    }
  });
  const contrasts = judged.map((s) => s.contrastDb);
  const rule: SettledRule = {
    consecutive: o.settledStrokes,
    maxContrastDb: o.settledMaxContrastDb,
    maxSlopeDbPerStroke: o.settledMaxSlopeDbPerStroke,
  };
  const fit = fitFade(contrasts, o.fitMinStrokes);
  const at = firstSettledPosition(contrasts, o);
  const settled =
    at >= 0
      ? { atStroke: judged[at].index ?? strokes.indexOf(judged[at]) + 1, atS: judged[at].startS ?? null }
      : null;
  let notSettling = false;
  if (!settled && fit && contrasts.length >= o.notSettlingMinStrokes) {
    const k = Math.min(o.notSettlingSlopeStrokes, contrasts.length);
    const slope = leastSquaresSlope(contrasts, contrasts.length - k, contrasts.length);
    notSettling = fit.floorDb > o.settledMaxContrastDb && Math.abs(slope) <= o.settledMaxSlopeDbPerStroke;
  }
  const forecast = settled ? 0 : fit && !notSettling ? strokesRemaining(contrasts, fit, o) : null;
  const forecastStable = settled ? true : forecastIsStable(contrasts, forecast, o);
  const state: SeatState =
    contrasts.length === 0 ? "no-strokes" : settled ? "settled" : notSettling ? "not-settling" : "fading";
  return {
    state,
    judgedStrokes: contrasts.length,
    leftOutStrokes: strokes.length - judged.length,
    leftOutByFlag,
    fit,
    strokesRemaining: forecastStable ? forecast : null,
    forecastStable,
    settled,
    notSettling,
    rule,
  };
}
