// The cap torque sheet cannot be set up wrong: a unit change converts the figure, a final torque
// far from the specification must be confirmed by its figure, the cap count must match the
// journals, the set-up can change until the first tick, a mistaken tick is undone with a reason,
// stages can be given as torques, and every bolt shows its place in the order before it is ticked.
import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { and, desc, eq } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { auditEntries, torqueSheets, torqueTicks } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const actions = await import("@/lib/actions/sheets");
const { initialActionState } = await import("@/lib/actions/state");
const sheets = await import("@/lib/heads/sheets");
const { TorqueTickList } = await import("@/components/sheets/torque-sheet");
const h = await import("./helpers");

let head: Awaited<ReturnType<typeof h.demoHead>>;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  // MHW-0141: Varda VX18, cap bolt torque 10 N·m in the demo library (db/seed.ts, invented), 5 journals per camshaft.
  head = await h.demoHead(state.t.db, "MHW-0141");
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const INES = "ines@millrace.example";
beforeEach(async () => {
  state.session = { user: { id: await h.userId(db(), INES) } };
});

const setup = (camshaft: number, o: Record<string, string> = {}) =>
  actions.saveTorqueSetup(
    initialActionState,
    h.form({
      jobId: head.jobId,
      camshaftId: head.camshafts[camshaft]!.id,
      capCount: "5",
      boltsPerCap: "2",
      orderMode: "centre-out",
      finalTorque: "10",
      finalTorqueUnit: "N·m",
      stageFractions: "0.5, 1",
      ...o,
    }),
  );

async function sheetOf(camshaft: number) {
  const view = await sheets.getTorqueSheets(db(), (await h.actorOf(db(), INES)).shopId, head.jobId);
  return view.camshafts.find((c) => c.id === head.camshafts[camshaft]!.id)!.sheet;
}

const lastAudit = async (action: string) =>
  (await db().select().from(auditEntries).where(and(eq(auditEntries.jobId, head.jobId), eq(auditEntries.action, action))).orderBy(desc(auditEntries.at)))[0];

const tick = (sheetId: string, stage: number, boltId: string) =>
  actions.saveTick(initialActionState, h.form({ jobId: head.jobId, sheetId, stage: String(stage), boltId }));

describe("a final torque far from the specification", () => {
  it("is refused without a confirmation naming both figures in N·m, and nothing is written", async () => {
    // The trap from the issue: 10 typed with lbf·in chosen is 1.13 N·m (NIST SP 811: 1 lbf·in = 0.1129848 N·m).
    const before = await h.snapshot(db());
    const res = await setup(0, { finalTorque: "10", finalTorqueUnit: "lbf·in" });
    expect(res.ok).toBe(false);
    const message = "A final torque of 1.1 N·m is 89 % below the specification's 10.0 N·m: check the figure and its unit, or confirm 1.1 N·m against 10.0 N·m.";
    expect(res.fieldErrors).toEqual({ confirmDeviation: [message] });
    expect(res.message).toBe(message);
    expect(await h.snapshot(db())).toEqual(before);
  });

  it("is refused when the confirmation names another figure", async () => {
    const res = await setup(0, { finalTorque: "10", finalTorqueUnit: "lbf·in", confirmDeviation: "10.0" });
    expect(res.fieldErrors.confirmDeviation).toHaveLength(1);
    expect(await sheetOf(0)).toBeNull();
  });

  it("is saved once confirmed by its own figure, and the audit entry keeps both figures", async () => {
    const res = await setup(0, { finalTorque: "13", finalTorqueUnit: "N·m", confirmDeviation: "13.0" });
    expect(res).toMatchObject({ ok: true });
    expect((await sheetOf(0))!.finalNm).toBeCloseTo(13, 5);
    expect((await lastAudit("torque_sheet.set_up"))!.after).toMatchObject({ confirmedAgainstSpec: { finalNm: 13, specNm: 10 } });
  });

  it("needs no confirmation within 10 % of the specification", async () => {
    // 7.4 lbf·ft = 10.03 N·m (NIST SP 811: 1 lbf·ft = 1.355818 N·m).
    expect(await setup(1, { finalTorque: "7.4", finalTorqueUnit: "lbf·ft" })).toMatchObject({ ok: true });
    expect((await sheetOf(1))!.finalNm).toBeCloseTo(10.033, 2);
  });
});

describe("the cap count", () => {
  it("must match the camshaft's journals, with a field error", async () => {
    const [sheet] = await db().select().from(torqueSheets).where(eq(torqueSheets.camshaftId, head.camshafts[1]!.id));
    const res = await setup(1, { capCount: "4" });
    expect(res.ok).toBe(false);
    expect(res.fieldErrors).toEqual({ capCount: [`${head.camshafts[1]!.label} has 5 journals, so 5 caps, not 4: count the caps again.`] });
    const [after] = await db().select().from(torqueSheets).where(eq(torqueSheets.camshaftId, head.camshafts[1]!.id));
    expect(after).toEqual(sheet);
  });
});

describe("changing the set-up and undoing a tick", () => {
  it("replaces the set-up while no bolt is ticked, with an audit entry of what it was", async () => {
    const old = (await sheetOf(1))!;
    expect(await setup(1, { finalTorque: "10", stageFractions: "0.3, 0.6, 1" })).toMatchObject({ ok: true });
    const changed = (await sheetOf(1))!;
    expect(changed.stages.map((s) => s.fraction)).toEqual([expect.closeTo(0.3, 5), expect.closeTo(0.6, 5), 1]);
    const entry = await lastAudit("torque_sheet.changed");
    expect(entry!.entityId).toBe(changed.id);
    expect(entry!.before).toMatchObject({ sheetId: old.id, stageFractions: [0.5, 1] });
  });

  it("refuses to change the set-up once a bolt is ticked", async () => {
    const sheet = (await sheetOf(1))!;
    expect(await tick(sheet.id, 1, sheet.next!.boltId)).toMatchObject({ ok: true });
    const res = await setup(1, { finalTorque: "10.5" });
    expect(res).toMatchObject({ ok: false, message: "Bolts are already ticked on this sheet; its order and torque can no longer change. Undo the ticks first if the set-up was wrong." });
    expect((await sheetOf(1))!.id).toBe(sheet.id);
  });

  it("undoes only the latest tick, only with a reason, and records it", async () => {
    const sheet = (await sheetOf(1))!;
    const [first, second] = sheet.order;
    expect(await tick(sheet.id, 1, second!)).toMatchObject({ ok: true });
    const undo = (o: Record<string, string>) => actions.undoLastTick(initialActionState, h.form({ jobId: head.jobId, sheetId: sheet.id, stage: "1", ...o }));

    const older = await undo({ boltId: first!, reason: "Ticked the wrong bolt." });
    expect(older).toMatchObject({ ok: false, message: `Only the latest tick can be undone: ${second} at stage 1. Undo ticks from the latest back.` });
    const noReason = await undo({ boltId: second!, reason: " " });
    expect(noReason.fieldErrors.reason).toEqual(["Say why the tick is undone, in at least 3 characters (e.g. ticked the wrong bolt)."]);
    expect((await sheetOf(1))!.ticks).toHaveLength(2);

    expect(await undo({ boltId: second!, reason: "Wrench slipped before it clicked." })).toMatchObject({ ok: true });
    const after = (await sheetOf(1))!;
    expect(after.ticks).toEqual([{ stage: 1, boltId: first }]);
    expect(after.next).toEqual({ stage: 1, boltId: second });
    const entry = await lastAudit("torque.tick_undone");
    expect(entry!.before).toMatchObject({ bolt: second, stage: 1 });
    expect(entry!.after).toEqual({ reason: "Wrench slipped before it clicked." });
    // Undo back to no tick at all, and the set-up is open again.
    expect(await undo({ boltId: first!, reason: "Start again with the maker's order." })).toMatchObject({ ok: true });
    expect(await setup(1, { finalTorque: "10.5" })).toMatchObject({ ok: true });
  });

  it("is refused to a technician on another technician's job and to an admin", async () => {
    const sheet = (await sheetOf(1))!;
    expect(await tick(sheet.id, 1, sheet.next!.boltId)).toMatchObject({ ok: true });
    const undo = () => actions.undoLastTick(initialActionState, h.form({ jobId: head.jobId, sheetId: sheet.id, stage: "1", boltId: sheet.next!.boltId, reason: "Not mine." }));
    for (const email of ["dov@millrace.example", "admin@millrace.example"]) {
      state.session = { user: { id: await h.userId(db(), email) } };
      expect(await undo()).toMatchObject({ ok: false });
    }
    expect(await db().select().from(torqueTicks).where(eq(torqueTicks.sheetId, sheet.id))).toHaveLength(1);
  });
});

describe("stages given as torques", () => {
  it("takes the stages before the final in the final's unit, with or without the final repeated", async () => {
    // Camshaft 0's sheet has no ticks, so each set-up replaces it.
    expect(await setup(0, { stageMode: "torques", stageTorques: "4, 7", finalTorque: "10" })).toMatchObject({ ok: true });
    expect((await sheetOf(0))!.stages.map((s) => s.nm)).toEqual([expect.closeTo(4, 4), expect.closeTo(7, 4), expect.closeTo(10, 4)]);
    expect(await setup(0, { stageMode: "torques", stageTorques: "3, 7.4", finalTorque: "7.4", finalTorqueUnit: "lbf·ft" })).toMatchObject({ ok: true });
    // 3 lbf·ft = 4.067 N·m (NIST SP 811).
    expect((await sheetOf(0))!.stages.map((s) => s.nm)).toEqual([expect.closeTo(4.067, 2), expect.closeTo(10.033, 2)]);
  });

  it("refuses a stage torque at or above the final, with a field error", async () => {
    const res = await setup(0, { stageMode: "torques", stageTorques: "4, 12", finalTorque: "10" });
    expect(res.fieldErrors).toEqual({ stageTorques: ["Each stage must be tighter than the one before, and every one below the final torque."] });
    const none = await setup(0, { stageMode: "torques", stageTorques: "", finalTorque: "10" });
    expect(none.fieldErrors.stageTorques).toEqual(["List the torques of the stages before the final one, like 4 (or 4, 7) for a final of 10."]);
  });
});

describe("the tick list", () => {
  it("shows every bolt's place in the order before it is ticked", async () => {
    const sheet = (await sheetOf(0))!;
    const html = renderToStaticMarkup(createElement(TorqueTickList, { jobId: head.jobId, sheet, specNm: 10, closed: false }));
    for (const st of sheet.stages)
      sheet.order.forEach((boltId, k) => {
        expect(html).toContain(`data-testid="tick-${st.stage}-${boltId}">${k + 1}. ${boltId}</button>`);
      });
    const closed = renderToStaticMarkup(createElement(TorqueTickList, { jobId: head.jobId, sheet, specNm: 10, closed: true }));
    expect(closed).toContain(`>1. ${sheet.order[0]}</span>`);
  });

  it("offers to change the set-up before the first tick, and to undo the latest tick after", async () => {
    const before = (await sheetOf(0))!;
    const open = renderToStaticMarkup(createElement(TorqueTickList, { jobId: head.jobId, sheet: before, specNm: 10, closed: false }));
    expect(open).toContain('data-testid="change-setup"');
    expect(open).not.toContain('data-testid="undo-tick"');
    expect(await tick(before.id, 1, before.next!.boltId)).toMatchObject({ ok: true });
    const ticked = (await sheetOf(0))!;
    const html = renderToStaticMarkup(createElement(TorqueTickList, { jobId: head.jobId, sheet: ticked, specNm: 10, closed: false }));
    expect(html).not.toContain('data-testid="change-setup"');
    expect(html).toContain(`Undo the last tick (${before.next!.boltId} at stage 1)`);
    expect(html).toContain('name="reason"');
  });
});
