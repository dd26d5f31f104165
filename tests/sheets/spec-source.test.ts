// Which specification a reading is judged against (library figure, job override, or one typed in), the clearance verdicts at and around the demo figures, and the torque sheet's source.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { jobSpecOverrides, measurements } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const sheets = await import("@/lib/heads/sheets");
const { saveClearanceReading } = await import("@/lib/actions/sheets");
const { initialActionState } = await import("@/lib/actions/state");
const h = await import("./helpers");

let head: Awaited<ReturnType<typeof h.demoHead>>;
let ines: Awaited<ReturnType<typeof h.actorOf>>;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  head = await h.demoHead(state.t.db, "MHW-0141");
  ines = await h.actorOf(state.t.db, "ines@millrace.example");
  state.session = { user: { id: ines.id } };
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const read = (journal: number, clearanceMm: number, spec: { minMm: number; maxMm: number; serviceLimitMm: number | null } | null = null) =>
  sheets.recordJournalClearance(db(), ines, {
    jobId: head.jobId,
    journalId: head.camshafts[0]!.journalIds[journal]!,
    clearanceMm,
    method: "strip",
    stripId: clearanceMm > 0.076 ? "wide" : "narrow",
    boreMm: null,
    journalMm: null,
    enteredUnit: "mm",
    spec,
  });

describe("journal clearance against the specification", () => {
  // Demo figures (invented demo data, db/seed.ts): Varda VX18 journal clearance 0.035–0.072 mm, service limit 0.1 mm.
  it("without an entered spec, judges against the library figure", async () => {
    expect(await read(0, 0.051)).toMatchObject({ verdict: "within_spec", specSource: "library" });
    expect(await read(1, 0.03)).toMatchObject({ verdict: "tight", specSource: "library" });
    expect(await read(2, 0.08)).toMatchObject({ verdict: "loose", specSource: "library" });
    // Reaching the service limit is beyond it (lib/measure/clearance.ts judgeClearance docs).
    expect(await read(3, 0.1)).toMatchObject({ verdict: "beyond_limit", specSource: "library" });
    const sheet = await sheets.getClearanceSheet(db(), ines.shopId, head.jobId);
    expect(sheet.spec).toMatchObject({ min: 0.035, max: 0.072, limit: 0.1, source: "library" });
    const j = sheet.camshafts[0]!.journals;
    expect(j.map((x) => x.reading?.verdict)).toEqual(["within_spec", "tight", "loose", "beyond_limit", undefined]);
    expect(j[0]!.reading!.spec).toEqual({ minMm: 0.035, maxMm: 0.072, serviceLimitMm: 0.1 });
  });

  it("after a job override, the next reading is judged against it", async () => {
    // An invented override for this test: 0.040–0.080 mm.
    await db().insert(jobSpecOverrides).values({ jobId: head.jobId, key: "journal_clearance", minValue: 0.04, maxValue: 0.08, unit: "mm", reason: "Oversize bore line-honed" });
    // 0.08 mm was loose against the library's 0.072 maximum; the override's maximum includes it.
    expect(await read(2, 0.08)).toMatchObject({ verdict: "within_spec", specSource: "job_override" });
    expect(await read(1, 0.038)).toMatchObject({ verdict: "tight", specSource: "job_override" });
    const [row] = await db()
      .select()
      .from(measurements)
      .where(and(eq(measurements.journalId, head.camshafts[0]!.journalIds[2]!), eq(measurements.kind, "journal_clearance")));
    expect(row).toMatchObject({ specMin: 0.04, specMax: 0.08, serviceLimit: null, specSource: "job_override" });
  });

  it("a spec typed on the form is 'entered'", async () => {
    const res = await saveClearanceReading(
      initialActionState,
      h.form({ jobId: head.jobId, journalId: head.camshafts[0]!.journalIds[4]!, method: "strip", stripId: "narrow", value: "0.051", unit: "mm", specMin: "0.06", specMax: "0.09", specLimit: "" }),
    );
    expect(res).toMatchObject({ ok: true, message: "0.051 mm — Tight." });
    const sheet = await sheets.getClearanceSheet(db(), ines.shopId, head.jobId);
    expect(sheet.camshafts[0]!.journals[4]!.reading).toMatchObject({ verdict: "tight", specSource: "entered", spec: { minMm: 0.06, maxMm: 0.09 } });
    expect(await read(3, 0.051, { minMm: 0.02, maxMm: 0.06, serviceLimitMm: null })).toMatchObject({ verdict: "within_spec", strip: { ok: true }, specSource: "entered", offScale: false });
  });
});

describe("torque sheet source", () => {
  const setup = (camshaft: number, finalNm: number) =>
    sheets.setUpTorqueSheet(db(), ines, {
      camshaftId: head.camshafts[camshaft]!.id,
      capCount: 5,
      boltsPerCap: 2,
      order: "centre-out",
      finalNm,
      stageFractions: [0.3, 0.6, 1],
    });

  it("a final torque equal to the library's 10 N·m (demo figure, db/seed.ts) is 'library'; another figure is 'entered'", async () => {
    await setup(0, 10);
    // 10.5 N·m is within 10 % of the specification, so it needs no confirmation.
    await setup(1, 10.5);
    const view = await sheets.getTorqueSheets(db(), ines.shopId, head.jobId);
    expect(view.torqueSpec).toMatchObject({ nominal: 10, source: "library" });
    expect(view.camshafts[0]!.sheet).toMatchObject({ finalNm: 10, specSource: "library" });
    expect(view.camshafts[0]!.sheet!.stages.map((s) => s.nm)).toEqual([3, 6, 10]);
    expect(view.camshafts[1]!.sheet).toMatchObject({ finalNm: 10.5, specSource: "entered" });
  });
});
