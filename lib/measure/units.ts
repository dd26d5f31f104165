// Units the measurement sheets accept, and the conversions between them. Everything is stored and
// judged in SI (mm, N·m, N); a reading keeps the unit it was typed in only for display.
import { z } from "zod";

export const LENGTH_UNITS = ["mm", "in", "um"] as const;
export const TORQUE_UNITS = ["N·m", "lbf·ft", "lbf·in", "kgf·m"] as const;
export const FORCE_UNITS = ["N", "lbf", "kgf"] as const;

export type LengthUnit = (typeof LENGTH_UNITS)[number];
export type TorqueUnit = (typeof TORQUE_UNITS)[number];
export type ForceUnit = (typeof FORCE_UNITS)[number];

export const lengthUnitSchema = z.enum(LENGTH_UNITS, { error: "Choose a unit: mm, in or µm." });
export const torqueUnitSchema = z.enum(TORQUE_UNITS, {
  error: "Choose a unit: N·m, lbf·ft, lbf·in or kgf·m.",
});
export const forceUnitSchema = z.enum(FORCE_UNITS, { error: "Choose a unit: N, lbf or kgf." });

/** How each unit is written on screen; "um" is the id because "µ" is awkward in forms and URLs. */
export const UNIT_LABELS: Record<LengthUnit | TorqueUnit | ForceUnit, string> = {
  mm: "mm",
  in: "in",
  um: "µm",
  "N·m": "N·m",
  "lbf·ft": "lbf·ft",
  "lbf·in": "lbf·in",
  "kgf·m": "kgf·m",
  N: "N",
  lbf: "lbf",
  kgf: "kgf",
};

const MM_PER: Record<LengthUnit, number> = {
  mm: 1,
  in: 25.4, // NIST SP 811 Appendix B: 1 in = 2.54 cm exactly
  um: 0.001, // SI prefix: 1 µm = 10⁻³ mm exactly
};

const NM_PER: Record<TorqueUnit, number> = {
  "N·m": 1,
  "lbf·ft": 1.355818, // NIST SP 811 Appendix B.8: pound-force foot → newton meter
  "lbf·in": 0.1129848, // NIST SP 811 Appendix B.8: pound-force inch → newton meter
  "kgf·m": 9.80665, // NIST SP 811 Appendix B.8: kilogram-force meter → newton meter (exact)
};

const N_PER: Record<ForceUnit, number> = {
  N: 1,
  lbf: 4.448222, // NIST SP 811 Appendix B.8: pound-force → newton
  kgf: 9.80665, // NIST SP 811 Appendix B.8: kilogram-force → newton (exact, standard gravity)
};

function finite(value: number, what: string): number {
  // A NaN slipping through a conversion would silently poison every verdict after it.
  if (!Number.isFinite(value))
    throw new RangeError(`${what} must be a finite number, got ${value}.`);
  return value;
}

export const toMm = (value: number, unit: LengthUnit): number =>
  finite(value, "Length") * MM_PER[unit];
export const fromMm = (mm: number, unit: LengthUnit): number => finite(mm, "Length") / MM_PER[unit];
export const toNm = (value: number, unit: TorqueUnit): number =>
  finite(value, "Torque") * NM_PER[unit];
export const fromNm = (nm: number, unit: TorqueUnit): number => finite(nm, "Torque") / NM_PER[unit];
export const toN = (value: number, unit: ForceUnit): number => finite(value, "Force") * N_PER[unit];
export const fromN = (n: number, unit: ForceUnit): number => finite(n, "Force") / N_PER[unit];

export const isLengthUnit = (u: string): u is LengthUnit =>
  (LENGTH_UNITS as readonly string[]).includes(u);
export const isTorqueUnit = (u: string): u is TorqueUnit =>
  (TORQUE_UNITS as readonly string[]).includes(u);
export const isForceUnit = (u: string): u is ForceUnit =>
  (FORCE_UNITS as readonly string[]).includes(u);

/** Rounds half away from zero at a decimal step; Math.round alone would send -0.05 to -0.0. */
export function roundTo(value: number, decimals: number): number {
  const f = 10 ** decimals;
  // The small nudge keeps values like 1.005 (stored as 1.00499…) from rounding down.
  return (Math.sign(value) * Math.round(Math.abs(value) * f + 1e-9)) / f;
}

export interface TorqueFigures {
  nm: number;
  lbfFt: number;
  lbfIn: number;
  kgfM: number;
}

/**
 * One torque as a sheet prints it. Wrenches are read to about a tenth of N·m or lbf·ft; kgf·m
 * figures are an order of magnitude smaller, so they keep two decimals to carry the same precision.
 */
export function formatTorque(nm: number): TorqueFigures {
  return {
    nm: roundTo(nm, 1),
    lbfFt: roundTo(fromNm(nm, "lbf·ft"), 1),
    lbfIn: roundTo(fromNm(nm, "lbf·in"), 0),
    kgfM: roundTo(fromNm(nm, "kgf·m"), 2),
  };
}

/**
 * A torque figure as typed, re-expressed in another unit when the unit beside it changes: the
 * torque stays the same, only its figure changes (typing 10 in N·m and then choosing lbf·in gives
 * 88.51, not a torque of 10 lbf·in). Four significant figures are finer than any torque wrench reads
 * and keep a round trip through another unit within 0.05 %. Text that is not a plain decimal is
 * left as typed, for the form's own check to refuse.
 */
export function convertTorqueText(text: string, from: TorqueUnit, to: TorqueUnit): string {
  const t = text.trim();
  if (from === to || !/^[+]?(\d+([.,]\d*)?|[.,]\d+)$/.test(t)) return text;
  const value = Number(t.replace(",", "."));
  if (value === 0) return text;
  return String(Number(fromNm(toNm(value, from), to).toPrecision(4)));
}

/** A list of torque figures ("4, 7.5": a comma separates figures, decimals take a point) in another unit. */
export function convertTorqueList(text: string, from: TorqueUnit, to: TorqueUnit): string {
  if (from === to || text.trim() === "") return text;
  return text
    .split(/[\s,;]+/)
    .filter(Boolean)
    .map((figure) => convertTorqueText(figure, from, to))
    .join(", ");
}

/** A clearance or diameter in mm to the micrometre, the resolution of the tools that measure it. */
export function formatMm(mm: number, decimals = 3): string {
  return `${roundTo(mm, decimals).toFixed(decimals)} mm`;
}
