// The specifications library's server side: figures saved as typed (in, lbf·ft) beside their SI
// values, engines renamed and retired with audit entries, the jobs on each engine, and the open
// jobs a changed figure reaches (not those with their own override, not signed-off ones).
import { and, desc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEntries, engineSpecs, jobs, specValues } from "@/db/schema";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const specs = await import("@/lib/actions/specs");
const { createJob, updateJob } = await import("@/lib/actions/jobs");
const { initialActionState } = await import("@/lib/actions/state");
const { engineSpecChoices } = await import("@/db/queries/options");
const { effectiveSpec } = await import("@/lib/specs/effective");
const { affectedOpenJobs, jobsUsingSpecs, listJobs } = await import("@/lib/specs/usage");
const h = await import("../sheets/helpers");

const db = () => state.t!.db;
const as = (id: string) => {
  state.session = { user: { id } } as typeof state.session;
};
const lastAudit = async (action: string, entityId: string) =>
  (
    await db()
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.action, action), eq(auditEntries.entityId, entityId)))
      .orderBy(desc(auditEntries.id))
      .limit(1)
  )[0];

let rhea: string;
let shopId: string;
let specId: string;
const jobId: Record<string, string> = {};

// Seeding the demo shop hashes every demo password; on a busy machine that can take a minute.
beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(db());
  rhea = await h.userId(db(), "rhea@millrace.example");
  shopId = (await h.actorOf(db(), "rhea@millrace.example")).shopId;
  as(rhea);
  expect(
    (
      await specs.createEngineSpec(
        initialActionState,
        h.form({ name: "Orrin K12 1.2 8V", source: "Orrin workshop manual (inch edition), p. 41" }),
      )
    ).ok,
  ).toBe(true);
  specId = (
    await db().select().from(engineSpecs).where(eq(engineSpecs.name, "Orrin K12 1.2 8V"))
  )[0]!.id;
  // Three demo jobs move onto this engine: two open, one signed off.
  for (const [number, status] of [
    ["MHW-0141", "at_bench"],
    ["MHW-0142", "queued"],
    ["MHW-0143", "signed_off"],
  ] as const) {
    const [row] = await db()
      .update(jobs)
      .set({ engineSpecId: specId, status })
      .where(eq(jobs.number, number))
      .returning({ id: jobs.id });
    jobId[number] = row!.id;
  }
}, 180_000);
afterAll(async () => {
  await state.t?.cleanup();
});

describe("figures as the manual gives them", () => {
  it("saves a stem-to-guide clearance typed in inches as mm, keeping what was typed", async () => {
    const res = await specs.saveSpecFigure(
      initialActionState,
      h.form({
        engineSpecId: specId,
        key: "stem_guide_clearance_intake",
        unit: "in",
        min: "0.0010",
        max: "0.0023",
        limit: "0.0031",
      }),
    );
    expect(res.ok).toBe(true);
    const [row] = await db()
      .select()
      .from(specValues)
      .where(
        and(eq(specValues.engineSpecId, specId), eq(specValues.key, "stem_guide_clearance_intake")),
      );
    expect(row).toMatchObject({
      unit: "mm",
      enteredUnit: "in",
      enteredText: { min: "0.0010", max: "0.0023", limit: "0.0031" },
    });
    // 25.4 mm per inch (NIST SP 811); the column is a 4-byte real, so six significant figures.
    expect(row!.minValue).toBeCloseTo(0.0254, 6);
    expect(row!.maxValue).toBeCloseTo(0.05842, 6);
    expect(row!.limitValue).toBeCloseTo(0.07874, 6);
    // The job works to the SI figure.
    const eff = await effectiveSpec(db(), jobId["MHW-0142"]!, "stem_guide_clearance_intake");
    expect(eff).toMatchObject({ unit: "mm", source: "library" });
    expect(eff!.max).toBeCloseTo(0.05842, 6);
  });

  it("saves a cap torque in lbf·ft as N·m", async () => {
    expect(
      (
        await specs.saveSpecFigure(
          initialActionState,
          h.form({ engineSpecId: specId, key: "cap_bolt_torque", unit: "lbf·ft", nominal: "7.4" }),
        )
      ).ok,
    ).toBe(true);
    const [row] = await db()
      .select()
      .from(specValues)
      .where(and(eq(specValues.engineSpecId, specId), eq(specValues.key, "cap_bolt_torque")));
    expect(row).toMatchObject({
      unit: "N·m",
      enteredUnit: "lbf·ft",
      enteredText: { nominal: "7.4" },
    });
    // 7.4 × 1.355 818 N·m (NIST SP 811) = 10.033 N·m.
    expect(row!.nominalValue).toBeCloseTo(10.0331, 3);
    expect(await lastAudit("spec.figure_saved", specId)).toMatchObject({
      after: { key: "cap_bolt_torque", enteredUnit: "lbf·ft", entered: { nominal: "7.4" } },
    });
  });

  it("refuses a bad unit or an absurd figure with field messages, saving nothing", async () => {
    const before = await db().select().from(specValues).where(eq(specValues.engineSpecId, specId));
    const wrongUnit = await specs.saveSpecFigure(
      initialActionState,
      h.form({ engineSpecId: specId, key: "deck_flatness", unit: "lbf·ft", max: "0.002" }),
    );
    expect(wrongUnit).toMatchObject({
      ok: false,
      fieldErrors: { unit: [expect.stringMatching(/is a length/)] },
    });
    const huge = await specs.saveSpecFigure(
      initialActionState,
      h.form({ engineSpecId: specId, key: "deck_flatness", unit: "in", max: "20" }),
    );
    expect(huge).toMatchObject({
      ok: false,
      fieldErrors: { max: [expect.stringMatching(/^20 in is 508 mm: far too large/)] },
    });
    const negative = await specs.saveSpecFigure(
      initialActionState,
      h.form({ engineSpecId: specId, key: "deck_flatness", unit: "in", max: "-0.002" }),
    );
    expect(negative.fieldErrors.max).toEqual(["The maximum cannot be negative."]);
    expect(await db().select().from(specValues).where(eq(specValues.engineSpecId, specId))).toEqual(
      before,
    );
  });
});

describe("which jobs a figure reaches", () => {
  it("lists every job on the engine, open and closed", async () => {
    const using = await jobsUsingSpecs(db(), shopId, [specId]);
    expect(using.get(specId)!.map((j) => j.number)).toEqual(["MHW-0141", "MHW-0142", "MHW-0143"]);
  });

  it("says which open jobs a change reaches, leaving out signed-off jobs and jobs with their own override", async () => {
    const reached = await affectedOpenJobs(db(), shopId, specId, "journal_clearance");
    expect(listJobs(reached)).toBe("MHW-0141 (at the bench) and MHW-0142 (queued)");
    // MHW-0141 gets its own journal clearance: a change of the library's no longer reaches it.
    const override = await specs.saveJobOverride(
      initialActionState,
      h.form({
        jobId: jobId["MHW-0141"]!,
        key: "journal_clearance",
        unit: "in",
        min: "0.0016",
        max: "0.0035",
        reason: "Line-bored oversize journals.",
      }),
    );
    expect(override.ok).toBe(true);
    const res = await specs.saveSpecFigure(
      initialActionState,
      h.form({
        engineSpecId: specId,
        key: "journal_clearance",
        min: "0.035",
        max: "0.072",
        limit: "0.1",
      }),
    );
    expect(res).toMatchObject({
      ok: true,
      message: "Camshaft journal oil clearance saved. Changed the limits for MHW-0142 (queued).",
    });
    expect(await lastAudit("spec.figure_saved", specId)).toMatchObject({
      after: { key: "journal_clearance", openJobs: ["MHW-0142"] },
    });
    // The override keeps its own figure, in its own unit.
    const eff = await effectiveSpec(db(), jobId["MHW-0141"]!, "journal_clearance");
    expect(eff).toMatchObject({ source: "job_override", unit: "mm", enteredUnit: "in", entered: { min: "0.0016", max: "0.0035" } });
    expect(eff!.max).toBeCloseTo(0.0889, 6);
    // Another figure of the same engine still reaches both open jobs.
    expect(listJobs(await affectedOpenJobs(db(), shopId, specId, "deck_flatness"))).toBe(
      "MHW-0141 (at the bench) and MHW-0142 (queued)",
    );
  });
});

describe("renaming and retiring an engine", () => {
  it("renames, audited with the old and new name, and refuses a name already in the library", async () => {
    const res = await specs.renameEngineSpec(
      initialActionState,
      h.form({ id: specId, name: "Orrin K12 1.2 8V (early)" }),
    );
    expect(res).toMatchObject({
      ok: true,
      message: "Orrin K12 1.2 8V is now called Orrin K12 1.2 8V (early).",
    });
    expect(await lastAudit("spec.renamed", specId)).toMatchObject({
      actorId: rhea,
      before: { name: "Orrin K12 1.2 8V" },
      after: { name: "Orrin K12 1.2 8V (early)" },
    });
    const taken = await specs.renameEngineSpec(
      initialActionState,
      h.form({ id: specId, name: "Varda VX18 1.8 16V" }),
    );
    expect(taken).toMatchObject({ ok: false, fieldErrors: { name: ["Already in the library."] } });
    expect((await db().select().from(engineSpecs).where(eq(engineSpecs.id, specId)))[0]!.name).toBe(
      "Orrin K12 1.2 8V (early)",
    );
  });

  it("a retired engine is not offered for new jobs, nor accepted by booking in, but stays on the jobs that use it", async () => {
    const res = await specs.setEngineSpecRetired(
      initialActionState,
      h.form({ id: specId, retired: "true" }),
    );
    expect(res).toMatchObject({
      ok: true,
      message: expect.stringMatching(/is retired: not offered for new jobs/),
    });
    expect(await lastAudit("spec.retired", specId)).toMatchObject({
      before: { retired: false },
      after: { retired: true },
    });
    expect((await engineSpecChoices(db(), shopId)).map((c) => c.id)).not.toContain(specId);
    // Editing a job on it still offers it, marked retired.
    expect(
      (await engineSpecChoices(db(), shopId, specId)).find((c) => c.id === specId)?.label,
    ).toBe("Orrin K12 1.2 8V (early) (retired)");
    const booked = await createJob(h.jobForm({ engineSpecId: specId }));
    expect(booked).toMatchObject({
      ok: false,
      fieldErrors: { engineSpecId: ["Retired: choose another engine."] },
    });
    // The job already on it keeps it when edited, and its figures still come from it.
    const job = (await db().select().from(jobs).where(eq(jobs.id, jobId["MHW-0142"]!)))[0]!;
    const head = await h.demoHead(db(), "MHW-0142");
    expect(head).toBeTruthy();
    const kept = await updateJob(
      job.id,
      h.jobForm({
        engineSpecId: specId,
        engineDescription: job.engineDescription,
        newCustomerName: "Kept Customer",
        arrangement: "v",
        cylinderCount: 6,
      }),
    );
    expect(kept, JSON.stringify(kept)).toMatchObject({ ok: true });
    expect((await effectiveSpec(db(), job.id, "cap_bolt_torque"))!.nominal).toBeCloseTo(10.0331, 3);
    // Retiring twice changes nothing; bringing it back offers it again.
    expect(
      await specs.setEngineSpecRetired(initialActionState, h.form({ id: specId, retired: "true" })),
    ).toMatchObject({ message: "Nothing to change." });
    expect(
      (
        await specs.setEngineSpecRetired(
          initialActionState,
          h.form({ id: specId, retired: "false" }),
        )
      ).ok,
    ).toBe(true);
    expect(await lastAudit("spec.reinstated", specId)).toMatchObject({ after: { retired: false } });
    expect((await engineSpecChoices(db(), shopId)).map((c) => c.id)).toContain(specId);
  });

  it("a technician can neither rename nor retire", async () => {
    as(await h.userId(db(), "ines@millrace.example"));
    expect(
      await specs.renameEngineSpec(initialActionState, h.form({ id: specId, name: "Hijacked" })),
    ).toMatchObject({ ok: false, message: expect.stringMatching(/supervisor or an admin/) });
    expect(
      await specs.setEngineSpecRetired(initialActionState, h.form({ id: specId, retired: "true" })),
    ).toMatchObject({ ok: false });
    expect(
      (await db().select().from(engineSpecs).where(eq(engineSpecs.id, specId)))[0],
    ).toMatchObject({ name: "Orrin K12 1.2 8V (early)", retiredAt: null });
    as(rhea);
  });
});
