// Booking in and editing jobs: createJob writes the head its layout implies, and updateJob rebuilds the layout only while nothing is recorded against it.
import { eq, inArray, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { camshafts, heads, journals, seats, valves } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { createJob, updateJob } = await import("@/lib/actions/jobs");
const { recordMeasurement } = await import("@/lib/heads/sheets");
const { jobFormSchema } = await import("@/lib/validations/jobs");
const h = await import("./helpers");

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  state.session = { user: { id: await h.userId(state.t.db, "rhea@millrace.example") } };
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
async function layoutOf(jobId: string) {
  const [head] = await db().select().from(heads).where(eq(heads.jobId, jobId));
  const n = async (q: Promise<Array<{ n: number }>>) => (await q)[0]!.n;
  const cams = await db().select({ id: camshafts.id }).from(camshafts).where(eq(camshafts.headId, head!.id));
  return {
    headId: head!.id,
    seats: await n(db().select({ n: sql<number>`count(*)::int` }).from(seats).where(eq(seats.headId, head!.id))),
    valves: await n(db().select({ n: sql<number>`count(*)::int` }).from(valves).where(eq(valves.headId, head!.id))),
    emptySeats: await n(
      db()
        .select({ n: sql<number>`count(*)::int` })
        .from(seats)
        .where(sql`${seats.headId} = ${head!.id} and not exists (select 1 from ${valves} where ${valves.seatId} = ${seats.id})`),
    ),
    camshafts: cams.length,
    journals: cams.length
      ? await n(db().select({ n: sql<number>`count(*)::int` }).from(journals).where(inArray(journals.camshaftId, cams.map((c) => c.id))))
      : 0,
  };
}

describe("createJob", () => {
  it("writes a head with one seat per valve position, a valve in each, and every camshaft's journals", async () => {
    const res = await createJob(h.jobForm());
    expect(res).toMatchObject({ ok: true });
    // 4 cylinders × (2 intake + 2 exhaust) = 16 seats; 2 camshafts × 5 journals = 10.
    expect(await layoutOf(res.jobId!)).toMatchObject({ seats: 16, valves: 16, emptySeats: 0, camshafts: 2, journals: 10 });
    const v6 = await createJob(h.jobForm({ arrangement: "v", cylinderCount: 6, camshaftCount: 4, journalsPerCamshaft: 4 }));
    expect(await layoutOf(v6.jobId!)).toMatchObject({ seats: 24, valves: 24, emptySeats: 0, camshafts: 4, journals: 16 });
  });

  it("accepts values jobFormSchema has already parsed (no promised date is null)", async () => {
    // The schema's output parses again: a caller that validated in the browser and sent the result is not refused.
    const parsed = jobFormSchema.parse(h.jobForm({ promisedOn: "" }));
    expect(parsed.promisedOn).toBeNull();
    expect(await createJob(parsed)).toMatchObject({ ok: true });
  });
});

describe("updateJob and the head's layout", () => {
  it("rebuilds seats when nothing is recorded, and refuses once a measurement exists", async () => {
    const made = await createJob(h.jobForm());
    const jobId = made.jobId!;
    const eightValve = { cylinderCount: 4, intakeValvesPerCylinder: 1, exhaustValvesPerCylinder: 1, camshaftCount: 1, journalsPerCamshaft: 5 };
    expect(await updateJob(jobId, h.jobForm(eightValve))).toMatchObject({ ok: true });
    const rebuilt = await layoutOf(jobId);
    expect(rebuilt).toMatchObject({ seats: 8, valves: 8, emptySeats: 0, camshafts: 1, journals: 5 });

    const rhea = await h.actorOf(db(), "rhea@millrace.example");
    await recordMeasurement(db(), rhea, { jobId, kind: "deck_flatness", seatId: null, valueSi: 0.03, enteredUnit: "mm", method: null, spec: null, note: null });
    const refused = await updateJob(jobId, h.jobForm({ ...eightValve, cylinderCount: 3 }));
    expect(refused).toMatchObject({ ok: false, message: "The head's layout cannot change: strokes or measurements are already recorded against it." });
    expect(await layoutOf(jobId)).toEqual(rebuilt);
  });

  it("refuses a layout change on MHW-0141, whose cylinder-1 seats have strokes (demo data, db/seed.ts)", async () => {
    const head = await h.demoHead(db(), "MHW-0141");
    const before = await layoutOf(head.jobId);
    const res = await updateJob(head.jobId, h.jobForm({ cylinderCount: 3 }));
    expect(res.ok).toBe(false);
    expect(res.message).toContain("layout cannot change");
    expect(await layoutOf(head.jobId)).toEqual(before);
  });
});
