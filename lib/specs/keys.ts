// The figures an engine's specification can hold, with the quantity each is measured in. Values
// are stored in SI base units (mm, N·m, N) and shown in the unit the shop prefers.
export type SpecQuantity = "length" | "torque" | "force";

export interface SpecKeyInfo {
  label: string;
  quantity: SpecQuantity;
  unit: "mm" | "N·m" | "N";
  /** Which of min / max / limit / nominal the figure uses. */
  fields: ReadonlyArray<"min" | "max" | "limit" | "nominal">;
}

export const SPEC_KEYS = {
  journal_clearance: { label: "Camshaft journal oil clearance", quantity: "length", unit: "mm", fields: ["min", "max", "limit"] },
  cap_bolt_torque: { label: "Camshaft cap bolt torque", quantity: "torque", unit: "N·m", fields: ["nominal"] },
  seat_contact_width_intake: { label: "Seat contact width, intake", quantity: "length", unit: "mm", fields: ["min", "max"] },
  seat_contact_width_exhaust: { label: "Seat contact width, exhaust", quantity: "length", unit: "mm", fields: ["min", "max"] },
  valve_stem_diameter_intake: { label: "Valve stem diameter, intake", quantity: "length", unit: "mm", fields: ["min", "max"] },
  valve_stem_diameter_exhaust: { label: "Valve stem diameter, exhaust", quantity: "length", unit: "mm", fields: ["min", "max"] },
  stem_guide_clearance_intake: { label: "Stem-to-guide clearance, intake", quantity: "length", unit: "mm", fields: ["min", "max", "limit"] },
  stem_guide_clearance_exhaust: { label: "Stem-to-guide clearance, exhaust", quantity: "length", unit: "mm", fields: ["min", "max", "limit"] },
  installed_spring_height: { label: "Installed spring height", quantity: "length", unit: "mm", fields: ["min", "max"] },
  spring_load: { label: "Spring load at installed height", quantity: "force", unit: "N", fields: ["min", "max"] },
  deck_flatness: { label: "Head deck flatness (max. distortion)", quantity: "length", unit: "mm", fields: ["max", "limit"] },
} as const satisfies Record<string, SpecKeyInfo>;

export type SpecKey = keyof typeof SPEC_KEYS;
export const SPEC_KEY_LIST = Object.keys(SPEC_KEYS) as SpecKey[];
