// Camshaft journal oil clearance: the plastic gauge strip ranges, a reading checked against its
// strip, clearance by subtraction of diameters, and the verdict against a specification. All in mm.
import { formatMm, roundTo } from "./units";

export type StripId = "narrow" | "wide";

export interface GaugeStrip {
  id: StripId;
  /** How a sentence names it: "the narrow strip". */
  name: string;
  label: string;
  minMm: number;
  maxMm: number;
  minIn: number;
  maxIn: number;
}

// The two ranges most plastic gauge strips are sold in (retail guides; common practice). The mm
// figures are the strips' own printed ends, not exact conversions of the inch ends.
export const GAUGE_STRIPS: readonly GaugeStrip[] = [
  {
    id: "narrow",
    name: "narrow strip",
    label: "Narrow strip 0.025–0.076 mm (0.001–0.003 in)",
    minMm: 0.025,
    maxMm: 0.076,
    minIn: 0.001,
    maxIn: 0.003,
  },
  {
    id: "wide",
    name: "wide strip",
    label: "Wide strip 0.051–0.152 mm (0.002–0.006 in)",
    minMm: 0.051,
    maxMm: 0.152,
    minIn: 0.002,
    maxIn: 0.006,
  },
];

export const STRIP_IDS = ["narrow", "wide"] as const satisfies readonly StripId[];

export function gaugeStrip(id: StripId): GaugeStrip {
  const strip = GAUGE_STRIPS.find((s) => s.id === id);
  if (!strip) throw new RangeError(`Unknown gauge strip "${String(id)}".`);
  return strip;
}

// A strip's inch scale ends at 0.003 in = 0.0762 mm while its mm scale ends at 0.076 mm: a reading
// taken on either printed scale must count as inside. Half a micrometre covers every such gap
// (largest is 0.0004 mm at 0.006 in) and is below what anyone can read off a crushed strip.
const STRIP_READING_SLACK_MM = 0.0005;

export type StripCheck =
  | { ok: true }
  | {
      ok: false;
      reason: "below-range" | "above-range";
      message: string;
      suggestedStripId: StripId | null;
    };

export function stripCheck(clearanceMm: number, stripId: StripId): StripCheck {
  if (!Number.isFinite(clearanceMm))
    throw new RangeError(`Clearance must be a finite number, got ${clearanceMm}.`);
  const strip = gaugeStrip(stripId);
  const covers = (s: GaugeStrip) =>
    clearanceMm >= s.minMm - STRIP_READING_SLACK_MM &&
    clearanceMm <= s.maxMm + STRIP_READING_SLACK_MM;
  if (covers(strip)) return { ok: true };

  const below = clearanceMm < strip.minMm;
  // Only point to another strip when that strip can actually read this clearance.
  const other = GAUGE_STRIPS.find((s) => s.id !== strip.id && covers(s)) ?? null;
  const range = (s: GaugeStrip) => `${s.minMm.toFixed(3)}–${s.maxMm.toFixed(3)} mm`;
  const head = `${formatMm(clearanceMm)} is ${below ? "below" : "beyond"} the ${strip.name}'s range (${range(strip)})`;
  const advice = other
    ? `use the next ${below ? "narrower" : "wider"} strip (the ${other.name}, ${range(other)})`
    : `use a ${below ? "narrower" : "wider"}-range strip or measure by bore and journal diameters`;
  return {
    ok: false,
    reason: below ? "below-range" : "above-range",
    suggestedStripId: other?.id ?? null,
    message: `${head}: ${advice}.`,
  };
}

/** Plausible camshaft journal and bore diameters; plausibility bounds, our own, not specifications. */
export const PLAUSIBLE_JOURNAL_DIAMETER_MM = { min: 10, max: 80 } as const;

/**
 * Oil clearance from a bore gauge and a micrometer reading: bore − journal. Rounded to a nanometre
 * only to drop floating-point noise (26.000 − 25.949 is 0.05100000000000193 in binary).
 */
export function clearanceFromDiameters(boreMm: number, journalMm: number): number {
  if (!Number.isFinite(boreMm) || boreMm <= 0)
    throw new RangeError(`Bore diameter must be a positive number, got ${boreMm}.`);
  if (!Number.isFinite(journalMm) || journalMm <= 0)
    throw new RangeError(`Journal diameter must be a positive number, got ${journalMm}.`);
  if (journalMm > boreMm) {
    throw new RangeError(
      `The journal (${formatMm(journalMm)}) is larger than its bore (${formatMm(boreMm)}): a shaft cannot be bigger than the hole it turns in, so re-measure both, or check they are from the same journal.`,
    );
  }
  return roundTo(boreMm - journalMm, 6);
}

export interface ClearanceSpec {
  minMm: number;
  maxMm: number;
  serviceLimitMm?: number | null;
}

export const CLEARANCE_VERDICTS = ["within_spec", "tight", "loose", "beyond_limit"] as const;
export type ClearanceVerdict = (typeof CLEARANCE_VERDICTS)[number];

// Readings and specs reach here through unit conversions; a spec of 0.003 in and a reading of
// 0.003 in must compare equal even if their binary mm values differ in the last bit.
const COMPARE_EPS_MM = 1e-9;

/**
 * Verdict against a specification. Boundaries:
 * - min and max are both inside the specification (a reading equal to either is within spec);
 * - reaching the service limit is beyond it (a limit is the wear at which the part is replaced),
 *   and the limit is checked first, so a limit equal to max makes max itself beyond limit;
 * - above max but below the limit is loose; below min is tight.
 */
export function judgeClearance(clearanceMm: number, spec: ClearanceSpec): ClearanceVerdict {
  if (!Number.isFinite(clearanceMm))
    throw new RangeError(`Clearance must be a finite number, got ${clearanceMm}.`);
  const { minMm, maxMm } = spec;
  const limit = spec.serviceLimitMm ?? null;
  if (!(minMm <= maxMm))
    throw new RangeError(
      `The specification's minimum (${minMm} mm) is above its maximum (${maxMm} mm).`,
    );
  if (limit !== null && !(limit >= maxMm))
    throw new RangeError(
      `The service limit (${limit} mm) is below the specification's maximum (${maxMm} mm).`,
    );

  if (limit !== null && clearanceMm >= limit - COMPARE_EPS_MM) return "beyond_limit";
  if (clearanceMm > maxMm + COMPARE_EPS_MM) return "loose";
  if (clearanceMm < minMm - COMPARE_EPS_MM) return "tight";
  return "within_spec";
}

export const CLEARANCE_VERDICT_LABELS: Record<ClearanceVerdict, string> = {
  within_spec: "Within spec",
  tight: "Tight",
  loose: "Loose",
  beyond_limit: "Beyond service limit",
};

// How to use a plastic gauge strip so its reading means something (manufacturers' service manuals).
export const GAUGE_RULES: readonly string[] = [
  "Clean the journal and the cap until both are dry and free of oil: oil lets the strip slide and spread unevenly.",
  "Lay the strip along the length of the journal, parallel to the shaft, and clear of any oil hole.",
  "Fit each cap in its marked place and direction, then tighten the cap bolts to the specified torque in the specified order.",
  "Never turn the camshaft while a strip is in place: it smears the strip and the reading is lost.",
  "Remove the caps and read the crushed strip at its widest point against the scale on its envelope.",
  "Remove every trace of the strip from the journal and cap before assembly.",
];
