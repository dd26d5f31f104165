// The other head measurements (seats, stems, guides, springs, deck) and the journal clearance as
// one list of kinds: what each measures, in what unit, where on the head, what input is plausible,
// and a plain in/out verdict against a specification.
import type { ForceUnit, LengthUnit } from "./units";

export const MEASUREMENT_KIND_IDS = [
  "journal_clearance",
  "seat_contact_width",
  "valve_stem_diameter",
  "stem_guide_clearance",
  "installed_spring_height",
  "spring_load",
  "deck_flatness",
] as const;

export type MeasurementKind = (typeof MEASUREMENT_KIND_IDS)[number];
export type Quantity = "length" | "force";
export type MeasurementScope = "seat" | "journal" | "head";

export interface MeasurementKindInfo {
  id: MeasurementKind;
  label: string;
  quantity: Quantity;
  defaultUnit: LengthUnit | ForceUnit;
  /**
   * Plausibility bounds, our own, not specifications: in mm for lengths and N for forces,
   * inclusive. They only catch slips (a 5 mm cam clearance, a unit mixed up); the verdict comes
   * from the specification.
   */
  plausibleSi: { min: number; max: number };
  scope: MeasurementScope;
  help: string | null;
}

export const MEASUREMENT_KINDS: Readonly<Record<MeasurementKind, MeasurementKindInfo>> = {
  journal_clearance: {
    id: "journal_clearance",
    label: "Camshaft journal oil clearance",
    quantity: "length",
    defaultUnit: "mm",
    plausibleSi: { min: 0, max: 0.5 },
    scope: "journal",
    help: "By plastic gauge strip, or bore diameter minus journal diameter.",
  },
  seat_contact_width: {
    id: "seat_contact_width",
    label: "Seat contact width",
    quantity: "length",
    defaultUnit: "mm",
    plausibleSi: { min: 0.3, max: 4 },
    scope: "seat",
    // Service manuals; the engine maker's figure decides.
    help: "Typically about 1.0–1.6 mm on intake seats and 1.2–2.2 mm on exhaust seats, varying by engine: use the engine maker's figure.",
  },
  valve_stem_diameter: {
    id: "valve_stem_diameter",
    label: "Valve stem diameter",
    quantity: "length",
    defaultUnit: "mm",
    plausibleSi: { min: 3, max: 12 },
    scope: "seat",
    help: "Measured on the valve that belongs to this seat.",
  },
  stem_guide_clearance: {
    id: "stem_guide_clearance",
    label: "Stem-to-guide clearance",
    quantity: "length",
    defaultUnit: "mm",
    // Wider than a direct clearance could be, because the rocking method reads larger.
    plausibleSi: { min: 0, max: 1 },
    scope: "seat",
    help: "Say how it was measured: a rocked valve on a dial indicator reads larger than guide bore minus stem, so compare it with a rocking specification.",
  },
  installed_spring_height: {
    id: "installed_spring_height",
    label: "Installed spring height",
    quantity: "length",
    defaultUnit: "mm",
    plausibleSi: { min: 20, max: 60 },
    scope: "seat",
    help: "From the spring seat to the underside of the retainer, with the valve closed.",
  },
  spring_load: {
    id: "spring_load",
    label: "Spring load at installed height",
    quantity: "force",
    defaultUnit: "N",
    plausibleSi: { min: 50, max: 1500 },
    scope: "seat",
    help: "The spring's force when compressed to the specified height.",
  },
  deck_flatness: {
    id: "deck_flatness",
    label: "Deck flatness (warp)",
    quantity: "length",
    defaultUnit: "mm",
    plausibleSi: { min: 0, max: 1 },
    scope: "head",
    help: "The largest feeler gauge that slides under a straightedge across the deck, checked lengthwise and diagonally.",
  },
};

/** The measurements of the head as a whole (not per seat or journal). */
export const HEAD_KINDS = MEASUREMENT_KIND_IDS.filter((k) => MEASUREMENT_KINDS[k].scope === "head");

export const STEM_GUIDE_METHODS = ["direct", "rocking"] as const;
export type StemGuideMethod = (typeof STEM_GUIDE_METHODS)[number];

export const STEM_GUIDE_METHOD_LABELS: Record<StemGuideMethod, string> = {
  direct: "Direct: guide bore gauge minus stem diameter",
  rocking:
    "Rocking: dial indicator on the valve rocked in its guide (reads larger; use a rocking specification)",
};

export const RANGE_VERDICTS = ["within_spec", "below", "above"] as const;
export type RangeVerdict = (typeof RANGE_VERDICTS)[number];

export interface RangeSpec {
  min?: number | null;
  max?: number | null;
}

// Values arrive through unit conversions; a reading equal to a limit in the same unit must not
// fall outside it by a floating-point last bit.
const COMPARE_EPS = 1e-9;

/**
 * In or out of a specification whose ends are both inclusive. Either end may be absent: a deck
 * has only a maximum warp, a spring only a minimum load.
 */
export function judgeRange(value: number, spec: RangeSpec): RangeVerdict {
  if (!Number.isFinite(value))
    throw new RangeError(`A measurement must be a finite number, got ${value}.`);
  const min = spec.min ?? null;
  const max = spec.max ?? null;
  if (min !== null && max !== null && min > max)
    throw new RangeError(`The specification's minimum (${min}) is above its maximum (${max}).`);
  if (min !== null && value < min - COMPARE_EPS) return "below";
  if (max !== null && value > max + COMPARE_EPS) return "above";
  return "within_spec";
}

export const RANGE_VERDICT_LABELS: Record<RangeVerdict, string> = {
  within_spec: "Within spec",
  below: "Below spec",
  above: "Above spec",
};

export function isPlausible(kind: MeasurementKind, valueSi: number): boolean {
  const { min, max } = MEASUREMENT_KINDS[kind].plausibleSi;
  return Number.isFinite(valueSi) && valueSi >= min && valueSi <= max;
}
