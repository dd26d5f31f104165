// How a head's layout expands into seats and camshafts. Numbering runs from the timing end,
// cylinder 1 first; on a V head odd cylinders sit on bank A and even ones on bank B (a common
// convention, not universal: the engine maker's figure decides).
import { z } from "zod";

export const headLayoutSchema = z
  .object({
    arrangement: z.enum(["inline", "v"]),
    cylinderCount: z.number().int().min(1, "At least one cylinder.").max(16, "At most 16 cylinders."),
    intakeValvesPerCylinder: z.number().int().min(1).max(3),
    exhaustValvesPerCylinder: z.number().int().min(1).max(3),
    camshaftCount: z.number().int().min(0).max(4),
    journalsPerCamshaft: z.number().int().min(0).max(12),
  })
  .refine((l) => l.arrangement === "inline" || l.cylinderCount % 2 === 0, {
    message: "A V head needs an even number of cylinders.",
    path: ["cylinderCount"],
  })
  .refine((l) => (l.camshaftCount === 0) === (l.journalsPerCamshaft === 0), {
    message: "Give journals for each camshaft, or no camshafts at all (pushrod head).",
    path: ["journalsPerCamshaft"],
  });

export type HeadLayout = z.infer<typeof headLayoutSchema>;

/** The head a new job starts from: an inline four, two intake and two exhaust valves a cylinder, twin cams of five journals. */
export const DEFAULT_HEAD_LAYOUT: HeadLayout = {
  arrangement: "inline",
  cylinderCount: 4,
  intakeValvesPerCylinder: 2,
  exhaustValvesPerCylinder: 2,
  camshaftCount: 2,
  journalsPerCamshaft: 5,
};

export interface SeatPosition {
  cylinder: number;
  kind: "intake" | "exhaust";
  position: number;
}

export function seatPositions(layout: HeadLayout): SeatPosition[] {
  const out: SeatPosition[] = [];
  for (let cylinder = 1; cylinder <= layout.cylinderCount; cylinder++) {
    for (let p = 1; p <= layout.intakeValvesPerCylinder; p++) {
      out.push({ cylinder, kind: "intake", position: p });
    }
    for (let p = 1; p <= layout.exhaustValvesPerCylinder; p++) {
      out.push({ cylinder, kind: "exhaust", position: p });
    }
  }
  return out;
}

export function bankOf(layout: Pick<HeadLayout, "arrangement">, cylinder: number): "A" | "B" | null {
  if (layout.arrangement === "inline") return null;
  return cylinder % 2 === 1 ? "A" : "B";
}

/** Labels camshafts the way a bench talks about them: intake/exhaust, per bank on a V. */
export function camshaftLabels(layout: HeadLayout): string[] {
  const n = layout.camshaftCount;
  if (n === 0) return [];
  if (layout.arrangement === "inline") {
    if (n === 1) return ["Camshaft"];
    if (n === 2) return ["Intake camshaft", "Exhaust camshaft"];
  } else {
    if (n === 2) return ["Bank A camshaft", "Bank B camshaft"];
    if (n === 4)
      return ["Bank A intake", "Bank A exhaust", "Bank B intake", "Bank B exhaust"];
  }
  return Array.from({ length: n }, (_, i) => `Camshaft ${i + 1}`);
}

/** The tag stamped or written on a valve for a seat, e.g. "3E2" for cylinder 3, exhaust 2. */
export function seatCode(seat: SeatPosition): string {
  return `${seat.cylinder}${seat.kind === "intake" ? "I" : "E"}${seat.position}`;
}

export function seatLabel(seat: SeatPosition): string {
  return `Cylinder ${seat.cylinder} · ${seat.kind === "intake" ? "Intake" : "Exhaust"} ${seat.position}`;
}
