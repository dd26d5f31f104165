// The cap torque sheet: bolt layout, the centre-outward order, entered orders, stages and ticks.
import { describe, expect, it } from "vitest";
import {
  boltLayout,
  checkTick,
  centreOutwardOrder,
  deviationMessage,
  deviationNeedsConfirmation,
  fractionsOfStageTorques,
  lastTick,
  explicitStages,
  nextExpectedTick,
  stagesFor,
  tickSequence,
  validateOrder,
  type BoltsPerCap,
  type Tick,
} from "@/lib/measure/torque";

const capOf = (id: string) => Number(/^C(\d+)/.exec(id)![1]);
const sideOf = (id: string) => id.split("-")[1] ?? null;

describe("boltLayout", () => {
  it("names bolts by cap from the timing end, with L/R rows for two bolts per cap", () => {
    expect(boltLayout(2, 2)).toEqual([
      { id: "C1-L", cap: 1, side: "L" },
      { id: "C1-R", cap: 1, side: "R" },
      { id: "C2-L", cap: 2, side: "L" },
      { id: "C2-R", cap: 2, side: "R" },
    ]);
    expect(boltLayout(3, 1).map((b) => b.id)).toEqual(["C1", "C2", "C3"]);
  });

  it("refuses impossible layouts", () => {
    expect(() => boltLayout(0, 2)).toThrow(RangeError);
    expect(() => boltLayout(13, 1)).toThrow(RangeError);
    expect(() => boltLayout(5, 3 as BoltsPerCap)).toThrow(RangeError);
  });
});

describe("centreOutwardOrder", () => {
  // Tightening from the centre outwards so the caps pull down evenly: common practice.
  const cases: Array<[number, BoltsPerCap]> = [
    [5, 1],
    [5, 2],
    [4, 1],
    [4, 2],
    [6, 1],
    [6, 2],
    [1, 2],
    [3, 2],
    [7, 1],
  ];

  it.each(cases)("%i caps × %i bolts is a permutation of every bolt", (caps, per) => {
    const order = centreOutwardOrder(caps, per);
    expect(order).toHaveLength(caps * per);
    expect(new Set(order).size).toBe(order.length);
    expect([...order].sort()).toEqual(
      boltLayout(caps, per)
        .map((b) => b.id)
        .sort(),
    );
    expect(validateOrder(order, caps, per)).toEqual([]);
  });

  it.each(cases)("%i caps × %i bolts never moves back towards the centre", (caps, per) => {
    const centre = (caps + 1) / 2;
    const distances = centreOutwardOrder(caps, per).map((id) => Math.abs(capOf(id) - centre));
    for (let i = 1; i < distances.length; i++)
      expect(distances[i]).toBeGreaterThanOrEqual(distances[i - 1]!);
  });

  it.each(cases)(
    "%i caps × %i bolts keeps a cap's bolts together and alternates sides of the centre",
    (caps, per) => {
      const order = centreOutwardOrder(caps, per);
      const capsInOrder = order.map(capOf).filter((c, i, a) => i === 0 || a[i - 1] !== c);
      expect(new Set(capsInOrder).size).toBe(caps); // every cap visited once, its bolts consecutive
      const centre = (caps + 1) / 2;
      const sides = capsInOrder.filter((c) => c !== centre).map((c) => Math.sign(c - centre));
      for (let i = 1; i < sides.length; i++) expect(sides[i]).not.toBe(sides[i - 1]);
    },
  );

  it("starts at the middle cap for an odd count and the two middle caps for an even count", () => {
    // 5 caps: cap 3 is the centre; 4 caps: 2 and 3; 6 caps: 3 and 4 (counting from the timing end).
    expect(centreOutwardOrder(5, 1)).toEqual(["C3", "C2", "C4", "C1", "C5"]);
    expect(centreOutwardOrder(4, 1).slice(0, 2).sort()).toEqual(["C2", "C3"]);
    expect(centreOutwardOrder(6, 1).slice(0, 2).sort()).toEqual(["C3", "C4"]);
    expect(centreOutwardOrder(6, 2).slice(0, 4).map(capOf).sort()).toEqual([3, 3, 4, 4]);
  });

  it("criss-crosses two rows: the side changes at every bolt", () => {
    for (const caps of [4, 5, 6]) {
      const sides = centreOutwardOrder(caps, 2).map(sideOf);
      for (let i = 1; i < sides.length; i++) expect(sides[i]).not.toBe(sides[i - 1]);
    }
  });
});

describe("validateOrder", () => {
  it("names a missing bolt", () => {
    expect(
      validateOrder(["C3-L", "C3-R", "C2-L", "C2-R", "C4-L", "C4-R", "C1-L", "C1-R", "C5-L"], 5, 2),
    ).toEqual(["C5-R is missing from the order."]);
  });

  it("names a duplicate with its positions, and the bolt it displaced", () => {
    const errors = validateOrder(["C2", "C1", "C2"], 3, 1);
    expect(errors).toContain("C2 appears 2 times in the order (positions 1, 3); list it once.");
    expect(errors).toContain("C3 is missing from the order.");
  });

  it("names an unknown bolt", () => {
    const errors = validateOrder(["C1-L", "C1-R", "C2-L", "C2-R", "C7-L"], 2, 2);
    expect(errors).toHaveLength(1);
    expect(errors[0]).toMatch(/^C7-L is not a bolt on this camshaft/);
    // A one-bolt id on a two-row camshaft is unknown too, and the row bolts are then missing.
    expect(validateOrder(["C1", "C1-R"], 1, 2)).toEqual([
      expect.stringMatching(/^C1 is not a bolt/),
      "C1-L is missing from the order.",
    ]);
  });
});

describe("stages", () => {
  it("splits the final torque by the default fractions 30 %, 60 %, 100 %", () => {
    const stages = stagesFor(10);
    expect(stages.map((s) => s.stage)).toEqual([1, 2, 3]);
    expect(stages.map((s) => s.nm)).toEqual([3, 6, 10]);
    expect(stages.map((s) => s.label)).toEqual(["Snug (30%)", "Pull-down (60%)", "Full (100%)"]);
  });

  it("calls a 50 % stage Half", () => {
    expect(stagesFor(10, [0.3, 0.5, 1]).map((s) => s.name)).toEqual(["Snug", "Half", "Full"]);
  });

  it("refuses stages that do not climb to the full torque", () => {
    expect(() => stagesFor(10, [0.3, 0.6])).toThrow(/last stage/);
    expect(() => stagesFor(10, [0.6, 0.3, 1])).toThrow(/tighter/);
    expect(() => stagesFor(10, [0, 1])).toThrow(RangeError);
    expect(() => stagesFor(10, [])).toThrow(RangeError);
    expect(() => stagesFor(0)).toThrow(RangeError);
  });

  it("takes explicit torques, the last being the final one", () => {
    const stages = explicitStages([4, 10]);
    expect(stages.map((s) => [s.name, s.nm, s.fraction])).toEqual([
      ["Snug", 4, 0.4],
      ["Full", 10, 1],
    ]);
    expect(() => explicitStages([10, 4])).toThrow(RangeError);
  });
});

describe("ticks", () => {
  const order = centreOutwardOrder(3, 2); // C2-L C2-R C1-L C1-R C3-L C3-R
  const stages = stagesFor(10, [0.3, 0.5, 1]);

  it("expects every bolt in order at stage 1, then all again at stage 2, and so on", () => {
    const seq = tickSequence(order, stages);
    expect(seq).toHaveLength(order.length * stages.length);
    expect(seq.slice(0, order.length).every((t) => t.stage === 1)).toBe(true);
    expect(seq[order.length]).toEqual({ stage: 2, boltId: order[0] });
  });

  it("accepts the whole sequence tick by tick and is done after the last stage", () => {
    const ticks: Tick[] = [];
    for (const s of stages) {
      for (const boltId of order) {
        expect(nextExpectedTick(order, stages, ticks)).toEqual({ stage: s.stage, boltId });
        expect(checkTick(order, stages, ticks, { stage: s.stage, boltId })).toEqual({ ok: true });
        ticks.push({ stage: s.stage, boltId });
      }
    }
    expect(nextExpectedTick(order, stages, ticks)).toBeNull();
    expect(checkTick(order, stages, ticks, { stage: 3, boltId: order[0]! })).toMatchObject({
      ok: false,
      reason: "complete",
      expected: null,
    });
  });

  it("refuses an out-of-order tick, naming the bolt and stage expected", () => {
    const ticks: Tick[] = order.map((boltId) => ({ stage: 1, boltId }));
    ticks.push({ stage: 2, boltId: order[0]! });
    // Skipping C2-R at stage 2 (Half, 50 % of 10 N·m = 5.0 N·m).
    const r = checkTick(order, stages, ticks, { stage: 2, boltId: order[2]! });
    expect(r).toEqual({
      ok: false,
      reason: "out-of-order",
      expected: { stage: 2, boltId: "C2-R" },
      message: "Out of order: tighten C2-R at stage 2 (Half, 5.0 N·m) first.",
    });
  });

  it("refuses jumping to the next stage before the current one is complete", () => {
    const ticks: Tick[] = [{ stage: 1, boltId: order[0]! }];
    const r = checkTick(order, stages, ticks, { stage: 2, boltId: order[0]! });
    expect(r).toMatchObject({
      ok: false,
      reason: "out-of-order",
      expected: { stage: 1, boltId: order[1] },
    });
    if (!r.ok) expect(r.message).toContain("stage 1 (Snug, 3.0 N·m)");
  });

  it("refuses a repeated tick, an unknown bolt and an unknown stage", () => {
    const ticks: Tick[] = [{ stage: 1, boltId: order[0]! }];
    expect(checkTick(order, stages, ticks, { stage: 1, boltId: order[0]! })).toMatchObject({
      ok: false,
      reason: "already-ticked",
    });
    expect(checkTick(order, stages, ticks, { stage: 1, boltId: "C9-L" })).toMatchObject({
      ok: false,
      reason: "unknown-bolt",
    });
    expect(checkTick(order, stages, ticks, { stage: 4, boltId: order[1]! })).toMatchObject({
      ok: false,
      reason: "unknown-stage",
    });
  });

  it("reads stored ticks in any order", () => {
    const ticks: Tick[] = order
      .slice(0, 4)
      .map((boltId) => ({ stage: 1, boltId }))
      .reverse();
    expect(nextExpectedTick(order, stages, ticks)).toEqual({ stage: 1, boltId: order[4] });
  });
});

describe("a final torque against the specification", () => {
  it("needs a confirmation only beyond 10 % either way", () => {
    expect(deviationNeedsConfirmation(11, 10)).toBe(false);
    expect(deviationNeedsConfirmation(9, 10)).toBe(false);
    expect(deviationNeedsConfirmation(11.01, 10)).toBe(true);
    expect(deviationNeedsConfirmation(8.99, 10)).toBe(true);
    expect(deviationNeedsConfirmation(1.13, null)).toBe(false);
  });

  it("names both figures in N·m", () => {
    // 10 lbf·in = 1.129848 N·m (NIST SP 811 Appendix B.8).
    expect(deviationMessage(1.129848, 10)).toBe(
      "A final torque of 1.1 N·m is 89 % below the specification's 10.0 N·m: check the figure and its unit, or confirm 1.1 N·m against 10.0 N·m.",
    );
  });
});

describe("stages given as torques", () => {
  it("are kept as shares of the final", () => {
    expect(fractionsOfStageTorques([4, 10])).toEqual([0.4, 1]);
    expect(() => fractionsOfStageTorques([10, 4])).toThrow("Each stage must be tighter than the one before.");
  });
});

describe("lastTick", () => {
  it("is the latest tick of the sequence, whatever order the rows come in", () => {
    const order = centreOutwardOrder(3, 1);
    const stages = stagesFor(10, [0.5, 1]);
    expect(lastTick(order, stages, [])).toBeNull();
    const ticks: Tick[] = [
      { stage: 2, boltId: order[0]! },
      { stage: 1, boltId: order[2]! },
      { stage: 1, boltId: order[0]! },
      { stage: 1, boltId: order[1]! },
    ];
    expect(lastTick(order, stages, ticks)).toEqual({ stage: 2, boltId: order[0] });
  });
});
