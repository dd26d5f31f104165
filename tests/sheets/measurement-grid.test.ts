// Measurements at bench speed: the seat × measurement grid and its row saves, a second reading of
// a figure replacing the first, the specification in force beside each field, a gauge strip read
// off its scale kept as off scale, and forms that name every refused field at once with its own
// message. On the demo V6 head pair MHW-0142 (invented demo data, db/seed.ts).
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEntries, jobSpecOverrides, measurements } from "@/db/schema";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const sheets = await import("@/lib/heads/sheets");
const { saveClearanceReading, saveMeasurement, saveSeatMeasurements, saveTorqueSetup } = await import("@/lib/actions/sheets");
const { initialActionState, toneOf } = await import("@/lib/actions/state");
const { unfinishedWork } = await import("@/lib/jobs/hand-in");
const h = await import("./helpers");

let head: Awaited<ReturnType<typeof h.demoHead>>;
let dov: Awaited<ReturnType<typeof h.actorOf>>;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  head = await h.demoHead(state.t.db, "MHW-0142");
  dov = await h.actorOf(state.t.db, "dov@millrace.example");
  state.session = { user: { id: dov.id } };
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const seat = (code: string) => head.seatByCode.get(code)!;
const rowsOf = (seatCode: string, kind: "seat_contact_width" | "spring_load") =>
  db()
    .select()
    .from(measurements)
    .where(and(eq(measurements.seatId, seat(seatCode)), eq(measurements.kind, kind)));

describe("the seat × measurement grid", () => {
  it("shows every seat with the specification in force for its kind, the job's override winning", async () => {
    const grid = await sheets.getMeasurementGrid(db(), dov.shopId, head.jobId);
    expect(grid.seats).toHaveLength(24);
    expect(grid.kinds).toEqual(["seat_contact_width", "valve_stem_diameter", "stem_guide_clearance", "installed_spring_height", "spring_load"]);
    const byCode = new Map(grid.seats.map((s) => [s.code, s]));
    // Halden HV30 demo figures (invented, db/seed.ts): intake 1.1–1.5 mm, exhaust 1.4–1.9 mm; no stem figures.
    expect(byCode.get("5I1")!.specs.seat_contact_width).toEqual({ min: 1.1, max: 1.5, source: "library" });
    expect(byCode.get("5E1")!.specs.seat_contact_width).toEqual({ min: 1.4, max: 1.9, source: "library" });
    expect(byCode.get("5I1")!.specs.valve_stem_diameter).toBeUndefined();

    await db().insert(jobSpecOverrides).values({ jobId: head.jobId, key: "seat_contact_width_exhaust", minValue: 1.5, maxValue: 1.8, unit: "mm", reason: "Hardened seats fitted" });
    const after = await sheets.getMeasurementGrid(db(), dov.shopId, head.jobId);
    expect(after.seats.find((s) => s.code === "5E1")!.specs.seat_contact_width).toEqual({ min: 1.5, max: 1.8, source: "job_override" });
    await db().delete(jobSpecOverrides).where(eq(jobSpecOverrides.jobId, head.jobId));
  });

  it("saves a seat's row in one go and judges each figure against the seat's own specification", async () => {
    const res = await saveSeatMeasurements(
      initialActionState,
      h.form({ jobId: head.jobId, seatId: seat("6I1"), seat_contact_width: "1.3", "seat_contact_width.unit": "mm", spring_load: "45", "spring_load.unit": "lbf" }),
    );
    expect(res).toMatchObject({ ok: true, tone: "ok" });
    expect(res.saved!.map((m) => [m.kind, m.verdict])).toEqual([
      ["seat_contact_width", "within_spec"],
      ["spring_load", null],
    ]);
    // 45 lbf = 200.17 N (NIST SP 811: 1 lbf = 4.448222 N).
    expect(res.saved![1]!.valueSi).toBeCloseTo(200.17, 2);
    const grid = await sheets.getMeasurementGrid(db(), dov.shopId, head.jobId);
    const row = grid.seats.find((s) => s.code === "6I1")!;
    expect(row.readings.seat_contact_width).toMatchObject({ valueSi: 1.3, verdict: "within_spec" });

    // An exhaust seat's width of 1.3 mm is below its own 1.4–1.9 mm: saved, in the warning tone.
    const exhaust = await saveSeatMeasurements(initialActionState, h.form({ jobId: head.jobId, seatId: seat("6E1"), seat_contact_width: "1.3" }));
    expect(exhaust).toMatchObject({ ok: true, tone: "warn" });
    expect(exhaust.message).toMatch(/seat contact width below spec/i);
  });

  it("names every refused figure of a row at once and saves none of them", async () => {
    const before = await h.snapshot(db());
    const res = await saveSeatMeasurements(
      initialActionState,
      h.form({ jobId: head.jobId, seatId: seat("6I2"), seat_contact_width: "1,2,3", valve_stem_diameter: "50", stem_guide_clearance: "0.04", installed_spring_height: "35" }),
    );
    expect(res.ok).toBe(false);
    expect(toneOf(res)).toBe("refused");
    expect(Object.keys(res.fieldErrors).sort()).toEqual(["seat_contact_width", "stemGuideMethod", "valve_stem_diameter"]);
    // Each message is the field's own: no clearance example on a width, the plausible range of a stem.
    expect(res.fieldErrors.seat_contact_width![0]).toBe("Enter the measurement as a plain number: digits with one decimal point or comma.");
    expect(res.fieldErrors.valve_stem_diameter![0]).toMatch(/^50 mm is not a plausible valve stem diameter \(3–12 mm\)/);
    expect(res.fieldErrors.stemGuideMethod![0]).toMatch(/direct .* or rocking/);
    expect(res.message).toBe("Check the 3 highlighted figures: nothing on this seat was saved.");
    expect(await h.snapshot(db())).toEqual(before);
  });

  it("replaces a second reading of the same figure on the same seat, and the audit trail keeps the first", async () => {
    const save = (value: string) =>
      saveMeasurement(initialActionState, h.form({ jobId: head.jobId, kind: "seat_contact_width", seatId: seat("5I2"), value, unit: "mm", specMin: "", specMax: "" }));
    const first = await save("1.25");
    expect(first).toMatchObject({ ok: true, saved: { valueSi: 1.25, replaced: null } });
    const second = await save("1.35");
    expect(second).toMatchObject({ ok: true, saved: { valueSi: 1.35, replaced: { valueSi: 1.25 } } });
    expect(second.message).toMatch(/replaces the earlier reading/);
    const rows = await rowsOf("5I2", "seat_contact_width");
    expect(rows).toHaveLength(1);
    expect(rows[0]!.value).toBeCloseTo(1.35, 5);
    const [edit] = await db().select().from(auditEntries).where(and(eq(auditEntries.entityId, rows[0]!.id), eq(auditEntries.action, "measurement.edited")));
    expect((edit!.before as { valueSi: number }).valueSi).toBeCloseTo(1.25, 5);
    // The grid shows the one that counts.
    const grid = await sheets.getMeasurementGrid(db(), dov.shopId, head.jobId);
    expect(grid.seats.find((s) => s.code === "5I2")!.readings.seat_contact_width!.valueSi).toBeCloseTo(1.35, 5);
    // The same figure typed again changes nothing and adds no audit entry.
    const audits = (await db().select().from(auditEntries)).length;
    await save("1.35");
    expect((await db().select().from(auditEntries)).length).toBe(audits);
  });
});

describe("a gauge strip read off its scale", () => {
  const journal = () => head.camshafts[0]!.journalIds[0]!;
  it("is saved as off scale with the advice, never as a measured clearance", async () => {
    // 0.160 mm is beyond the wide strip's 0.051–0.152 mm (retail guides; common practice).
    const res = await saveClearanceReading(
      initialActionState,
      h.form({ jobId: head.jobId, journalId: journal(), method: "strip", stripId: "wide", value: "0.160", unit: "mm", specMin: "", specMax: "", specLimit: "" }),
    );
    expect(res).toMatchObject({ ok: true, tone: "warn", saved: { offScale: true, verdict: null } });
    expect(res.message).toMatch(/^Saved as off scale, not as a clearance: .*beyond the wide strip's range .*measure by bore and journal diameters/);
    const sheet = await sheets.getClearanceSheet(db(), dov.shopId, head.jobId);
    expect(sheet.camshafts[0]!.journals[0]!.reading).toMatchObject({ offScale: true, verdict: null });
    const listed = (await sheets.listMeasurements(db(), dov.shopId, head.jobId)).find((m) => m.kind === "journal_clearance");
    expect(listed!.verdict).toBe("off_scale");
    // The hand-in still counts that journal as not measured.
    const work = await unfinishedWork(db(), head.jobId);
    expect(work.sheets.find((s) => s.startsWith(sheet.camshafts[0]!.label))).toMatch(/0 of 4 journals measured/);
  });

  it("a narrow strip below its scale points to the other strip; measured again in range, it is a clearance", async () => {
    const below = await saveClearanceReading(
      initialActionState,
      h.form({ jobId: head.jobId, journalId: journal(), method: "strip", stripId: "wide", value: "0.030", unit: "mm" }),
    );
    expect(below.message).toMatch(/use the next narrower strip \(the narrow strip/);
    const good = await saveClearanceReading(
      initialActionState,
      h.form({ jobId: head.jobId, journalId: journal(), method: "strip", stripId: "narrow", value: "0.050", unit: "mm" }),
    );
    // Halden HV30 demo figure 0.04–0.08 mm (invented, db/seed.ts).
    expect(good).toMatchObject({ ok: true, tone: "ok", message: "0.050 mm — Within spec.", saved: { offScale: false, verdict: "within_spec" } });
  });
});

describe("every refused field at once, each with its own message", () => {
  it("a clearance reading and its specification are refused together", async () => {
    const before = await h.snapshot(db());
    const res = await saveClearanceReading(
      initialActionState,
      h.form({ jobId: head.jobId, journalId: head.camshafts[1]!.journalIds[0]!, method: "strip", stripId: "narrow", value: "abc", unit: "mm", specMin: "0.09", specMax: "0.05", specLimit: "x" }),
    );
    expect(res.ok).toBe(false);
    expect(res.fieldErrors).toEqual({
      value: ["Enter the strip reading as a number, like 0.051."],
      serviceLimit: ["Enter the service limit as a number, like 0.120."],
    });
    expect(res.message).toBe("Check the 2 highlighted fields: nothing was saved.");
    expect(await h.snapshot(db())).toEqual(before);
  });

  it("a cap count is asked for as a count, not like a clearance", async () => {
    const res = await saveTorqueSetup(
      initialActionState,
      h.form({ jobId: head.jobId, camshaftId: head.camshafts[3]!.id, capCount: "four", boltsPerCap: "2", orderMode: "centre-out", finalTorque: "11", finalTorqueUnit: "N·m" }),
    );
    expect(res.fieldErrors.capCount).toEqual(["Enter the number of caps as a whole number, like 5."]);
    expect(JSON.stringify(res.fieldErrors)).not.toMatch(/0\.051/);
    const half = await saveTorqueSetup(
      initialActionState,
      h.form({ jobId: head.jobId, camshaftId: head.camshafts[3]!.id, capCount: "3.5", boltsPerCap: "2", orderMode: "centre-out", finalTorque: "11", finalTorqueUnit: "N·m" }),
    );
    expect(half.fieldErrors.capCount).toEqual(["Enter the number of caps as a whole number, like 5."]);
  });
});
