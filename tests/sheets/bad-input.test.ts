// Bad input to the sheet and job actions: field-level messages for each slip, and the database left exactly as it was.
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { jobs, seats } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const actions = await import("@/lib/actions/sheets");
const { createJob } = await import("@/lib/actions/jobs");
const { initialActionState } = await import("@/lib/actions/state");
const h = await import("./helpers");

let head: Awaited<ReturnType<typeof h.demoHead>>;
let other: Awaited<ReturnType<typeof h.demoHead>>;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  head = await h.demoHead(state.t.db, "MHW-0141");
  other = await h.demoHead(state.t.db, "MHW-0142");
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const signInAs = async (email: string) => {
  state.session = { user: { id: await h.userId(db(), email) } };
};
const strip = (o: Record<string, string>) =>
  actions.saveClearanceReading(
    initialActionState,
    h.form({ jobId: head.jobId, journalId: head.camshafts[0]!.journalIds[0]!, method: "strip", stripId: "narrow", value: "0.051", unit: "mm", ...o }),
  );

/** Runs a refused action and checks the database did not move. */
async function refused(run: () => Promise<{ ok: boolean; message: string | null; fieldErrors: Record<string, string[]> }>) {
  const before = await h.snapshot(db());
  const res = await run();
  expect(res.ok).toBe(false);
  expect(await h.snapshot(db())).toEqual(before);
  return res;
}

describe("clearance reading", () => {
  beforeEach(() => signInAs("ines@millrace.example"));

  it("refuses a value that is not a number, blank, negative or absurd", async () => {
    expect((await refused(() => strip({ value: "abc" }))).fieldErrors).toEqual({ value: ["Enter the strip reading as a number, like 0.051."] });
    expect((await refused(() => strip({ value: "" }))).fieldErrors).toEqual({ value: ["Enter the strip reading."] });
    expect((await refused(() => strip({ value: "-0.02" }))).fieldErrors).toEqual({ value: ["A measurement cannot be negative."] });
    // 5 mm is far beyond any camshaft journal oil clearance (plausibility bound 0–0.5 mm, lib/measure/results.ts).
    const absurd = await refused(() => strip({ value: "5" }));
    expect(absurd.fieldErrors.value![0]).toMatch(/^5 mm is not a plausible camshaft journal oil clearance/);
  });

  it("refuses an unknown unit", async () => {
    const res = await refused(() => strip({ unit: "furlong" }));
    expect(res.fieldErrors).toEqual({ unit: ["Choose a unit: mm, in or µm."] });
  });

  it("refuses a journal that does not exist, or that belongs to another head", async () => {
    const missing = await refused(() => strip({ journalId: crypto.randomUUID() }));
    expect(missing).toMatchObject({ message: "That journal does not exist on this head.", fieldErrors: { journalId: ["No such journal."] } });
    // A supervisor may work on both jobs, so only the head check stands between the form and MHW-0142.
    await signInAs("rhea@millrace.example");
    const foreign = await refused(() => strip({ journalId: other.camshafts[0]!.journalIds[0]! }));
    expect(foreign).toMatchObject({ message: "That journal does not exist on this head.", fieldErrors: { journalId: ["No such journal."] } });
  });

  it("refuses a bore smaller than its journal", async () => {
    const res = await refused(() =>
      actions.saveClearanceReading(
        initialActionState,
        h.form({ jobId: head.jobId, journalId: head.camshafts[0]!.journalIds[0]!, method: "diameters", boreValue: "25.95", journalValue: "26.00", unit: "mm" }),
      ),
    );
    expect(res.fieldErrors).toEqual({ journalValue: ["The journal cannot be larger than its bore: re-measure both, on the same journal."] });
  });
});

describe("other measurements and torque", () => {
  beforeEach(() => signInAs("ines@millrace.example"));

  it("refuses a specification whose minimum is above its maximum", async () => {
    const res = await refused(() =>
      actions.saveMeasurement(
        initialActionState,
        h.form({ jobId: head.jobId, kind: "seat_contact_width", seatId: head.seatByCode.get("3I1")!, value: "1.2", unit: "mm", specMin: "1.4", specMax: "1.0" }),
      ),
    );
    expect(res.fieldErrors).toEqual({ "spec.max": ["The maximum is below the minimum: check the two values."] });
  });

  const setup = (order: string) =>
    actions.saveTorqueSetup(
      initialActionState,
      h.form({ jobId: head.jobId, camshaftId: head.camshafts[0]!.id, capCount: "5", boltsPerCap: "2", orderMode: "maker", order, finalTorque: "10", finalTorqueUnit: "N·m" }),
    );

  it("refuses a maker's order with a bolt missing or listed twice", async () => {
    const all = ["C3-L", "C3-R", "C2-L", "C2-R", "C4-L", "C4-R", "C1-L", "C1-R", "C5-L", "C5-R"];
    const missing = await refused(() => setup(all.slice(0, -1).join(", ")));
    expect(missing.fieldErrors).toEqual({ order: ["C5-R is missing from the order."] });
    const twice = await refused(() => setup([...all.slice(0, -1), "C3-L"].join(" ")));
    expect(twice.fieldErrors.order).toEqual(["C3-L appears 2 times in the order (positions 1, 10); list it once.", "C5-R is missing from the order."]);
  });

  it("refuses a tick out of order, naming the bolt and stage expected", async () => {
    expect(await setup("centre-out")).toMatchObject({ ok: true });
    const sheets = await import("@/lib/heads/sheets");
    const view = await sheets.getTorqueSheets(db(), (await h.actorOf(db(), "ines@millrace.example")).shopId, head.jobId);
    const sheet = view.camshafts[0]!.sheet!;
    // Centre-out on five caps starts at cap 3 (common practice, lib/measure/torque.ts); stage 1 is 30 % of 10 N·m.
    const res = await refused(() => actions.saveTick(initialActionState, h.form({ jobId: head.jobId, sheetId: sheet.id, stage: "1", boltId: "C1-L" })));
    expect(res.message).toBe("Out of order: tighten C3-L at stage 1 (Snug, 3.0 N·m) first.");
  });
});

describe("booking in a job", () => {
  beforeEach(() => signInAs("rhea@millrace.example"));
  const counts = async () => ({
    jobs: (await db().select({ n: sql<number>`count(*)::int` }).from(jobs))[0]!.n,
    seats: (await db().select({ n: sql<number>`count(*)::int` }).from(seats))[0]!.n,
  });

  it("refuses a V head of 5 cylinders, a missing engine description and no customer, with field messages", async () => {
    const before = await counts();
    const v5 = await createJob(h.jobForm({ arrangement: "v", cylinderCount: 5 }));
    expect(v5).toMatchObject({ ok: false, fieldErrors: { cylinderCount: ["A V head needs an even number of cylinders."] } });
    const { engineDescription: _omit, ...noEngine } = h.jobForm();
    const engine = await createJob(noEngine);
    expect(engine).toMatchObject({ ok: false, fieldErrors: { engineDescription: ["Describe the engine."] } });
    const nobody = await createJob(h.jobForm({ customerId: "", newCustomerName: "" }));
    expect(nobody).toMatchObject({ ok: false, fieldErrors: { customerId: ["Choose a customer or type a new one."] } });
    expect(await counts()).toEqual(before);
  });
});
