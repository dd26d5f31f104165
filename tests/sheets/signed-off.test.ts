// A signed-off head is read-only: every sheet write and the job edit are refused with a conflict (HTTP 409) that says so, and nothing is written.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const sheets = await import("@/lib/heads/sheets");
const actions = await import("@/lib/actions/sheets");
const { updateJob } = await import("@/lib/actions/jobs");
const { initialActionState } = await import("@/lib/actions/state");
const { ConflictError, errorResponse } = await import("@/lib/errors");
const h = await import("./helpers");

let head: Awaited<ReturnType<typeof h.demoHead>>;
let sheetId: string;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  head = await h.demoHead(state.t.db, "MHW-0141");
  const ines = await h.actorOf(state.t.db, "ines@millrace.example");
  // A torque sheet exists before sign-off, so a tick has something to be refused on.
  sheetId = await sheets.setUpTorqueSheet(state.t.db, ines, {
    camshaftId: head.camshafts[0]!.id,
    capCount: 5,
    boltsPerCap: 2,
    order: "centre-out",
    finalNm: 10,
    stageFractions: [0.3, 0.6, 1],
  });
  await h.setStatus(state.t.db, head.jobId, "signed_off");
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const SIGNED_OFF = /MHW-0141 is signed off/;

describe("signed-off head", () => {
  it("every service write throws ConflictError, mapped to HTTP 409, and nothing is written", async () => {
    const ines = await h.actorOf(db(), "ines@millrace.example");
    const valve = await h.valveIn(db(), head, "3I1");
    const writes: Array<[string, () => Promise<unknown>]> = [
      [
        "clearance",
        () =>
          sheets.recordJournalClearance(db(), ines, {
            journalId: head.camshafts[0]!.journalIds[0]!,
            clearanceMm: 0.051,
            method: "strip",
            stripId: "narrow",
            boreMm: null,
            journalMm: null,
            enteredUnit: "mm",
            spec: null,
          }),
      ],
      [
        "torque setup",
        () =>
          sheets.setUpTorqueSheet(db(), ines, {
            camshaftId: head.camshafts[1]!.id,
            capCount: 5,
            boltsPerCap: 2,
            order: "centre-out",
            finalNm: 10,
            stageFractions: [0.3, 0.6, 1],
          }),
      ],
      ["tick", () => sheets.tickBolt(db(), ines, { sheetId, stage: 1, boltId: "C3-L" })],
      [
        "measurement",
        () =>
          sheets.recordMeasurement(db(), ines, {
            jobId: head.jobId,
            kind: "deck_flatness",
            seatId: null,
            valueSi: 0.03,
            enteredUnit: "mm",
            method: null,
            spec: null,
            note: null,
          }),
      ],
      ["valve identity", () => sheets.updateValveIdentity(db(), ines, { valveId: valve.id, tag: "3I1", partNumber: "VI-9999", serial: null })],
      ["move", () => sheets.moveValve(db(), ines, { valveId: valve.id, toSeatId: head.seatByCode.get("3I2")! })],
    ];
    const before = await h.snapshot(db());
    for (const [what, write] of writes) {
      const err = await write().then(
        () => null,
        (e: unknown) => e,
      );
      expect(err, what).toBeInstanceOf(ConflictError);
      expect((err as Error).message, what).toMatch(SIGNED_OFF);
      const res = errorResponse(err);
      expect(res.status, what).toBe(409);
      expect(await res.json(), what).toMatchObject({ error: "conflict" });
    }
    expect(await h.snapshot(db())).toEqual(before);
  });

  it("the actions answer with the signed-off message, updateJob included, and nothing is written", async () => {
    state.session = { user: { id: await h.userId(db(), "ines@millrace.example") } };
    const valve = await h.valveIn(db(), head, "3I1");
    const jobId = head.jobId;
    const before = await h.snapshot(db());
    const results = [
      await actions.saveClearanceReading(
        initialActionState,
        h.form({ jobId, journalId: head.camshafts[0]!.journalIds[1]!, method: "strip", stripId: "narrow", value: "0.05", unit: "mm" }),
      ),
      await actions.saveTorqueSetup(
        initialActionState,
        h.form({ jobId, camshaftId: head.camshafts[1]!.id, capCount: "5", boltsPerCap: "2", orderMode: "centre-out", finalTorque: "10", finalTorqueUnit: "N·m" }),
      ),
      await actions.saveTick(initialActionState, h.form({ jobId, sheetId, stage: "1", boltId: "C3-L" })),
      await actions.saveMeasurement(initialActionState, h.form({ jobId, kind: "deck_flatness", value: "0.03", unit: "mm" })),
      await actions.saveValveIdentity(initialActionState, h.form({ jobId, valveId: valve.id, tag: "3I1", partNumber: "VI-1", serial: "" })),
      await actions.saveValveMove(initialActionState, h.form({ jobId, valveId: valve.id, toSeatId: head.seatByCode.get("3I2")! })),
    ];
    for (const r of results) expect(r).toMatchObject({ ok: false, message: expect.stringMatching(SIGNED_OFF) });

    state.session = { user: { id: await h.userId(db(), "rhea@millrace.example") } };
    const edit = await updateJob(jobId, h.jobForm({ engineDescription: "Edited after sign-off" }));
    expect(edit).toMatchObject({ ok: false, message: expect.stringMatching(SIGNED_OFF) });
    expect(await h.snapshot(db())).toEqual(before);
  });
});
