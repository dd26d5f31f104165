// The camshaft cap torque sheet: the bolt layout of one camshaft, a suggested tightening order,
// the stages, and which bolt the technician must tick next. The engine maker's order and figures
// always override what is suggested here.
import { formatTorque } from "./units";

export type BoltsPerCap = 1 | 2;
export type BoltSide = "L" | "R";

export interface Bolt {
  /** "C3-L" / "C3-R" for two bolts per cap, "C3" for one; caps count from the timing end. */
  id: string;
  cap: number;
  side: BoltSide | null;
}

/** A camshaft has at most this many caps; matches the head layout's journal limit. */
export const MAX_CAPS = 12;

/** Plausible final cap bolt torques; plausibility bounds, our own, not specifications. */
export const PLAUSIBLE_CAP_TORQUE_NM = { min: 1, max: 150 } as const;

function checkLayout(capCount: number, boltsPerCap: number): asserts boltsPerCap is BoltsPerCap {
  if (!Number.isInteger(capCount) || capCount < 1 || capCount > MAX_CAPS)
    throw new RangeError(`A camshaft has between 1 and ${MAX_CAPS} caps, got ${capCount}.`);
  if (boltsPerCap !== 1 && boltsPerCap !== 2)
    throw new RangeError(`A cap has 1 or 2 bolts, got ${boltsPerCap}.`);
}

export const boltId = (cap: number, side: BoltSide | null): string =>
  side ? `C${cap}-${side}` : `C${cap}`;

export function boltLayout(capCount: number, boltsPerCap: BoltsPerCap): Bolt[] {
  checkLayout(capCount, boltsPerCap);
  const sides: (BoltSide | null)[] = boltsPerCap === 2 ? ["L", "R"] : [null];
  const out: Bolt[] = [];
  for (let cap = 1; cap <= capCount; cap++)
    for (const side of sides) out.push({ id: boltId(cap, side), cap, side });
  return out;
}

/**
 * Caps from the centre outwards: the middle cap (or the two middle caps) first, then the pair one
 * cap further out, and so on; in each pair the cap nearer the timing end goes first, so the order
 * alternates either side of the centre. Pulling the shaft down from the middle lets it seat
 * evenly rather than rocking on an end cap (common practice).
 */
export function centreOutwardCaps(capCount: number): number[] {
  checkLayout(capCount, 1);
  const centre = (capCount + 1) / 2;
  return Array.from({ length: capCount }, (_, i) => i + 1).sort(
    (a, b) => Math.abs(a - centre) - Math.abs(b - centre) || a - b,
  );
}

/**
 * The suggested order. With two bolts per cap both bolts of a cap go together, left then right;
 * so every step to the next cap crosses the shaft diagonally (right of one cap to left of the next)
 * and the sides alternate all the way through. Only a suggestion: the engine maker's figure wins.
 */
export function centreOutwardOrder(capCount: number, boltsPerCap: BoltsPerCap): string[] {
  checkLayout(capCount, boltsPerCap);
  const sides: (BoltSide | null)[] = boltsPerCap === 2 ? ["L", "R"] : [null];
  return centreOutwardCaps(capCount).flatMap((cap) => sides.map((side) => boltId(cap, side)));
}

/** Everything wrong with an entered order, one sentence per bolt; empty when it is usable. */
export function validateOrder(
  order: readonly string[],
  capCount: number,
  boltsPerCap: BoltsPerCap,
): string[] {
  checkLayout(capCount, boltsPerCap);
  const layout = boltLayout(capCount, boltsPerCap);
  const known = new Set(layout.map((b) => b.id));
  const positions = new Map<string, number[]>();
  order.forEach((id, i) => positions.set(id, [...(positions.get(id) ?? []), i + 1]));

  const describe =
    boltsPerCap === 2
      ? `caps C1–C${capCount} with a left and a right bolt (C1-L, C1-R…)`
      : `caps C1–C${capCount}, one bolt each`;
  const errors: string[] = [];
  for (const [id, at] of positions) {
    if (!known.has(id))
      errors.push(`${id || "(blank)"} is not a bolt on this camshaft (${describe}).`);
    else if (at.length > 1)
      errors.push(
        `${id} appears ${at.length} times in the order (positions ${at.join(", ")}); list it once.`,
      );
  }
  for (const bolt of layout)
    if (!positions.has(bolt.id)) errors.push(`${bolt.id} is missing from the order.`);
  return errors;
}

export interface TighteningStage {
  /** 1-based, as the sheet numbers it. */
  stage: number;
  /** Short name used in sentences: "Snug", "Half", "Full". */
  name: string;
  /** Name with its share of the final torque: "Snug (30%)". */
  label: string;
  fraction: number;
  nm: number;
}

export const DEFAULT_STAGE_FRACTIONS: readonly number[] = [0.3, 0.6, 1];
export const MAX_STAGES = 5;

function stageName(index: number, count: number, fraction: number): string {
  if (index === count - 1) return "Full";
  if (index === 0) return "Snug";
  if (Math.abs(fraction - 0.5) < 1e-9) return "Half";
  return "Pull-down";
}

/** Why a list of stage fractions is unusable, or null. Shared with the form schema. */
export function stageFractionsProblem(fractions: readonly number[]): string | null {
  if (fractions.length < 1 || fractions.length > MAX_STAGES)
    return `Use between 1 and ${MAX_STAGES} stages.`;
  if (fractions.some((f) => !Number.isFinite(f) || f <= 0 || f > 1))
    return "Each stage is a share of the final torque above 0 and at most 100%.";
  for (let i = 1; i < fractions.length; i++)
    if (!(fractions[i]! > fractions[i - 1]!))
      return "Each stage must be tighter than the one before.";
  // A sheet that never reaches the specified torque would let a head be signed off under-tightened.
  if (Math.abs(fractions[fractions.length - 1]! - 1) > 1e-9)
    return "The last stage must be the full specified torque (100%).";
  return null;
}

function buildStages(finalNm: number, fractions: readonly number[]): TighteningStage[] {
  return fractions.map((fraction, i) => {
    const name = stageName(i, fractions.length, fraction);
    return {
      stage: i + 1,
      name,
      label: `${name} (${Math.round(fraction * 100)}%)`,
      fraction,
      nm: finalNm * fraction,
    };
  });
}

export function stagesFor(
  finalNm: number,
  fractions: readonly number[] = DEFAULT_STAGE_FRACTIONS,
): TighteningStage[] {
  if (!Number.isFinite(finalNm) || finalNm <= 0)
    throw new RangeError(`The final torque must be above 0 N·m, got ${finalNm}.`);
  const problem = stageFractionsProblem(fractions);
  if (problem) throw new RangeError(problem);
  return buildStages(finalNm, fractions.length ? [...fractions.slice(0, -1), 1] : fractions);
}

/** Stages given as torques (as some makers print them, e.g. 4 then 10 N·m); the last is the final torque. */
export function explicitStages(torquesNm: readonly number[]): TighteningStage[] {
  if (torquesNm.length < 1 || torquesNm.length > MAX_STAGES)
    throw new RangeError(`Use between 1 and ${MAX_STAGES} stages.`);
  if (torquesNm.some((t) => !Number.isFinite(t) || t <= 0))
    throw new RangeError("Every stage needs a torque above 0 N·m.");
  for (let i = 1; i < torquesNm.length; i++)
    if (!(torquesNm[i]! > torquesNm[i - 1]!))
      throw new RangeError("Each stage must be tighter than the one before.");
  const finalNm = torquesNm[torquesNm.length - 1]!;
  return buildStages(
    finalNm,
    torquesNm.map((t) => t / finalNm),
  ).map((s, i) => ({ ...s, nm: torquesNm[i]! }));
}

/**
 * Stage fractions from explicit stage torques (as some makers print them, e.g. 4 then 10 N·m), so a
 * sheet keeps one stored form whichever way its stages were given. The last torque is the final.
 */
export function fractionsOfStageTorques(torquesNm: readonly number[]): number[] {
  return explicitStages(torquesNm).map((s) => s.fraction);
}

/** A final torque further than this share from the specification in force must be confirmed. */
export const TORQUE_DEVIATION_TO_CONFIRM = 0.1;

/** How far a final torque strays from the specification, as a share of it (0.1 is 10 %). */
export function torqueDeviation(finalNm: number, specNm: number): number {
  return Math.abs(finalNm - specNm) / specNm;
}

export function deviationNeedsConfirmation(finalNm: number, specNm: number | null | undefined): boolean {
  return specNm != null && specNm > 0 && torqueDeviation(finalNm, specNm) > TORQUE_DEVIATION_TO_CONFIRM;
}

/** The figure a confirmation names, in N·m to a tenth, as the sheet prints it. */
export const confirmationFigure = (finalNm: number): string => formatTorque(finalNm).nm.toFixed(1);

/** The sentence that asks for the confirmation: both figures in N·m and how far apart they are. */
export function deviationMessage(finalNm: number, specNm: number): string {
  const pct = Math.round(torqueDeviation(finalNm, specNm) * 100);
  return `A final torque of ${confirmationFigure(finalNm)} N·m is ${pct} % ${finalNm < specNm ? "below" : "above"} the specification's ${confirmationFigure(specNm)} N·m: check the figure and its unit, or confirm ${confirmationFigure(finalNm)} N·m against ${confirmationFigure(specNm)} N·m.`;
}

export interface Tick {
  stage: number;
  boltId: string;
}

/** The whole sheet in the order it is worked: every bolt at stage 1, then every bolt at stage 2… */
export function tickSequence(order: readonly string[], stages: readonly TighteningStage[]): Tick[] {
  return stages.flatMap((s) => order.map((boltId) => ({ stage: s.stage, boltId })));
}

const tickKey = (t: Tick) => `${t.stage}|${t.boltId}`;

/** The tick recorded last in the sheet's sequence (the only one that may be undone), or null. */
export function lastTick(order: readonly string[], stages: readonly TighteningStage[], ticks: readonly Tick[]): Tick | null {
  const done = new Set(ticks.map(tickKey));
  return tickSequence(order, stages).findLast((t) => done.has(tickKey(t))) ?? null;
}

/**
 * The first tick of the sequence not yet recorded, or null when the sheet is complete. Ticks are
 * matched as a set, so rows read back from storage in any order give the same answer.
 */
export function nextExpectedTick(
  order: readonly string[],
  stages: readonly TighteningStage[],
  ticks: readonly Tick[],
): Tick | null {
  const done = new Set(ticks.map(tickKey));
  return tickSequence(order, stages).find((t) => !done.has(tickKey(t))) ?? null;
}

export type TickCheck =
  | { ok: true }
  | {
      ok: false;
      reason: "out-of-order" | "already-ticked" | "unknown-bolt" | "unknown-stage" | "complete";
      /** What should be ticked now; null once the sheet is complete. */
      expected: Tick | null;
      message: string;
    };

function describeStage(stage: TighteningStage): string {
  return `stage ${stage.stage} (${stage.name}, ${formatTorque(stage.nm).nm.toFixed(1)} N·m)`;
}

export function checkTick(
  order: readonly string[],
  stages: readonly TighteningStage[],
  ticks: readonly Tick[],
  attempted: Tick,
): TickCheck {
  const expected = nextExpectedTick(order, stages, ticks);
  const stageOf = (n: number) => stages.find((s) => s.stage === n);
  if (!order.includes(attempted.boltId))
    return {
      ok: false,
      reason: "unknown-bolt",
      expected,
      message: `${attempted.boltId} is not a bolt on this sheet.`,
    };
  if (!stageOf(attempted.stage))
    return {
      ok: false,
      reason: "unknown-stage",
      expected,
      message: `This sheet has stages 1 to ${stages.length}; there is no stage ${attempted.stage}.`,
    };
  if (!expected)
    return {
      ok: false,
      reason: "complete",
      expected: null,
      message: "Every bolt is already ticked at every stage.",
    };
  if (ticks.some((t) => tickKey(t) === tickKey(attempted)))
    return {
      ok: false,
      reason: "already-ticked",
      expected,
      message: `${attempted.boltId} is already ticked at ${describeStage(stageOf(attempted.stage)!)}; next is ${expected.boltId} at ${describeStage(stageOf(expected.stage)!)}.`,
    };
  if (tickKey(expected) !== tickKey(attempted))
    return {
      ok: false,
      reason: "out-of-order",
      expected,
      message: `Out of order: tighten ${expected.boltId} at ${describeStage(stageOf(expected.stage)!)} first.`,
    };
  return { ok: true };
}
