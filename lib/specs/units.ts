// The units a specification figure may be typed in, per quantity, and the conversion of what was
// typed into the SI value stored beside it. Factors come from lib/measure/units.ts (NIST SP 811,
// Appendix B): 1 in = 25.4 mm exactly, 1 lbf·ft = 1.355 818 N·m, 1 lbf·in = 0.112 984 8 N·m,
// 1 lbf = 4.448 222 N.
import {
  FORCE_UNITS,
  LENGTH_UNITS,
  TORQUE_UNITS,
  UNIT_LABELS,
  toMm,
  toN,
  toNm,
  type ForceUnit,
  type LengthUnit,
  type TorqueUnit,
} from "@/lib/measure/units";
import type { SpecQuantity } from "./keys";

export type SpecUnit = LengthUnit | TorqueUnit | ForceUnit;

/** Units offered for each quantity, the SI one first. */
export const SPEC_UNITS: Record<SpecQuantity, readonly SpecUnit[]> = {
  length: LENGTH_UNITS,
  torque: TORQUE_UNITS,
  force: FORCE_UNITS,
};

export const SI_UNIT: Record<SpecQuantity, "mm" | "N·m" | "N"> = {
  length: "mm",
  torque: "N·m",
  force: "N",
};

/**
 * The largest SI value that makes sense for a figure of each quantity on a cylinder head: a
 * clearance, width or height beyond 100 mm, a bolt torque beyond 500 N·m or a spring load beyond
 * 5 000 N is a unit or a decimal point gone wrong (common practice: cylinder-head figures in
 * service manuals sit far below these).
 */
export const SI_CEILING: Record<SpecQuantity, number> = { length: 100, torque: 500, force: 5000 };

export function unitFits(quantity: SpecQuantity, unit: string): unit is SpecUnit {
  return (SPEC_UNITS[quantity] as readonly string[]).includes(unit);
}

/** A figure typed in `unit` as its SI value (mm, N·m or N). */
export function toSi(quantity: SpecQuantity, value: number, unit: SpecUnit): number {
  switch (quantity) {
    case "length":
      return toMm(value, unit as LengthUnit);
    case "torque":
      return toNm(value, unit as TorqueUnit);
    case "force":
      return toN(value, unit as ForceUnit);
  }
}

export const unitLabel = (unit: string): string => UNIT_LABELS[unit as SpecUnit] ?? unit;

/** An SI value as the library prints it beside the figure as entered: enough digits for the tools that measure it. */
export function formatSi(quantity: SpecQuantity, value: number): string {
  const digits = quantity === "length" ? (value < 1 ? 4 : 3) : 1;
  return `${Number(value.toFixed(digits))} ${SI_UNIT[quantity]}`;
}
