// Handing a head in for audit with a guard: what is unfinished is listed and must be confirmed,
// the technician may take the head back until the supervisor starts the audit, and new work on a
// head awaiting audit puts it back at the bench, each with its audit entry.
import { and, desc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEntries, jobs, seats } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";
import { jsonRequest, sessionBody, strokeInputs } from "../bench/helpers";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const jobActions = await import("@/lib/actions/jobs");
const sheetActions = await import("@/lib/actions/sheets");
const reviewActions = await import("@/lib/actions/review");
const { initialActionState } = await import("@/lib/actions/state");
const { unfinishedWork } = await import("@/lib/jobs/hand-in");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const strokesRoute = await import("@/app/api/sessions/[sessionId]/strokes/route");
const h = await import("../sheets/helpers");

let head: Awaited<ReturnType<typeof h.demoHead>>;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  // MHW-0141 (db/seed.ts, invented): at the bench, Ines's, cylinder 1's seats settled, the others waiting or lapping.
  head = await h.demoHead(state.t.db, "MHW-0141");
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const signInAs = async (email: string) => {
  state.session = { user: { id: await h.userId(db(), email) } };
};
const statusOf = async () => (await db().select({ s: jobs.status }).from(jobs).where(eq(jobs.id, head.jobId)))[0]!.s;
const lastAudit = async (action: string) =>
  (await db().select().from(auditEntries).where(and(eq(auditEntries.jobId, head.jobId), eq(auditEntries.action, action))).orderBy(desc(auditEntries.at)))[0];
const handIn = (o: Record<string, string> = {}) =>
  jobActions.changeJobStatus(initialActionState, h.form({ jobId: head.jobId, to: "awaiting_audit", ...o }));
const takeBack = () => jobActions.takeHeadBack(initialActionState, h.form({ jobId: head.jobId }));

// In seat map order: by cylinder, intake before exhaust.
const OPEN_SEATS = ["2I1", "2I2", "2E1", "2E2", "3I1", "3I2", "3E1", "3E2", "4I1", "4I2", "4E1", "4E2"];

describe("handing in", () => {
  it("lists the seats not settled in fine and the sheets not complete", async () => {
    const u = await unfinishedWork(db(), head.jobId);
    expect(u.seats).toEqual(OPEN_SEATS);
    const [intake, exhaust] = head.camshafts.map((c) => c.label);
    expect(u.sheets).toEqual([
      `${intake} clearance: 0 of 5 journals measured`,
      `${intake} cap torque: not set up`,
      `${exhaust} clearance: 0 of 5 journals measured`,
      `${exhaust} cap torque: not set up`,
    ]);
  });

  it("is refused without the confirmation when something is unfinished, and nothing moves", async () => {
    await signInAs("ines@millrace.example");
    const auditsBefore = (await db().select().from(auditEntries)).length;
    const res = await handIn();
    expect(res.ok).toBe(false);
    expect(res.message).toMatch(/^Unfinished — seats not settled in fine: 2I1, 2I2, 2E1, .*4E2; sheets not complete: .*cap torque: not set up\. Confirm to hand it in as it is, or finish first\.$/);
    expect(res.fieldErrors.confirmUnfinished).toEqual([res.message]);
    expect(await statusOf()).toBe("at_bench");
    expect((await db().select().from(auditEntries)).length).toBe(auditsBefore);
    expect((await handIn({ confirmUnfinished: "maybe" })).fieldErrors.confirmUnfinished).toEqual(["Tick the box to hand the head in with unfinished work."]);
  });

  it("goes through once confirmed, and the audit entry keeps what was unfinished", async () => {
    expect(await handIn({ confirmUnfinished: "yes" })).toMatchObject({ ok: true, message: "Handed in for audit, unfinished work noted." });
    expect(await statusOf()).toBe("awaiting_audit");
    const entry = await lastAudit("job.status_changed");
    expect(entry!.after).toMatchObject({ status: "awaiting_audit", unfinished: { seats: OPEN_SEATS } });
  });
});

describe("taking a head back", () => {
  it("works until the supervisor starts the audit, with an audit entry", async () => {
    await signInAs("ines@millrace.example");
    expect(await takeBack()).toMatchObject({ ok: true, message: "Taken back to the bench." });
    expect(await statusOf()).toBe("at_bench");
    expect((await lastAudit("job.taken_back"))!.after).toEqual({ status: "at_bench" });
    expect(await takeBack()).toMatchObject({ ok: false, message: "Job MHW-0141 is not awaiting audit; there is nothing to take back." });
  });

  it("is refused once the supervisor has judged a seat since the hand-in", async () => {
    await signInAs("ines@millrace.example");
    expect(await handIn({ confirmUnfinished: "yes" })).toMatchObject({ ok: true });
    await signInAs("rhea@millrace.example");
    const review = await reviewActions.submitSeatReview(
      initialActionState,
      h.form({ seatId: head.seatByCode.get("1I1")!, jobId: head.jobId, decision: "approved", comment: "Even grey ring all round." }),
    );
    expect(review).toMatchObject({ ok: true });
    await signInAs("ines@millrace.example");
    expect(await takeBack()).toMatchObject({ ok: false, message: "The supervisor has started the audit of MHW-0141: ask them to send it back instead." });
    expect(await statusOf()).toBe("awaiting_audit");
  });

  it("is refused to a technician of another job", async () => {
    await signInAs("dov@millrace.example");
    expect(await takeBack()).toMatchObject({ ok: false, message: "Job MHW-0141 is assigned to another technician. Ask a supervisor to reassign it." });
    expect(await statusOf()).toBe("awaiting_audit");
  });
});

describe("new work on a head awaiting audit", () => {
  const expectBackAtBench = async (work: string) => {
    expect(await statusOf()).toBe("at_bench");
    expect((await lastAudit("job.back_to_bench"))!.after).toEqual({ status: "at_bench", work });
  };

  it("a supervisor checking a figure during the audit leaves it awaiting audit", async () => {
    await signInAs("rhea@millrace.example");
    expect(await statusOf()).toBe("awaiting_audit");
    const res = await sheetActions.saveMeasurement(initialActionState, h.form({ jobId: head.jobId, kind: "deck_flatness", value: "0.02", unit: "mm" }));
    expect(res).toMatchObject({ ok: true });
    expect(await statusOf()).toBe("awaiting_audit");
  });

  it("a measurement puts it back at the bench, with an audit entry", async () => {
    await signInAs("ines@millrace.example");
    expect(await statusOf()).toBe("awaiting_audit");
    const res = await sheetActions.saveMeasurement(initialActionState, h.form({ jobId: head.jobId, kind: "deck_flatness", value: "0.03", unit: "mm" }));
    expect(res).toMatchObject({ ok: true });
    await expectBackAtBench("deck flatness (warp)");
  });

  it("a cap torque set-up does too", async () => {
    await h.setStatus(db(), head.jobId, "awaiting_audit");
    const res = await sheetActions.saveTorqueSetup(
      initialActionState,
      h.form({ jobId: head.jobId, camshaftId: head.camshafts[0]!.id, capCount: "5", boltsPerCap: "2", orderMode: "centre-out", finalTorque: "10", finalTorqueUnit: "N·m" }),
    );
    expect(res).toMatchObject({ ok: true });
    await expectBackAtBench("cap torque set-up");
  });

  it("a new lapping session (new strokes) does too", async () => {
    await h.setStatus(db(), head.jobId, "awaiting_audit");
    const seatId = head.seatByCode.get("3E1")!;
    const res = await sessionsRoute.POST(jsonRequest(`/api/seats/${seatId}/sessions`, sessionBody("coarse", "phone-ines-1")), { params: Promise.resolve({ seatId }) });
    expect(res.status).toBe(201);
    await expectBackAtBench("lapping 3E1 (coarse)");
    expect((await db().select({ s: seats.state }).from(seats).where(eq(seats.id, seatId)))[0]!.s).toBe("lapping");
  });

  it("new strokes in a session started before the hand-in do too", async () => {
    const seatId = head.seatByCode.get("3E2")!;
    const body = sessionBody("coarse", "phone-ines-2");
    expect((await sessionsRoute.POST(jsonRequest(`/api/seats/${seatId}/sessions`, body), { params: Promise.resolve({ seatId }) })).status).toBe(201);
    await h.setStatus(db(), head.jobId, "awaiting_audit");
    const res = await strokesRoute.POST(jsonRequest(`/api/sessions/${body.sessionId}/strokes`, { strokes: strokeInputs([6, 5, 4.5], 1) }), {
      params: Promise.resolve({ sessionId: body.sessionId }),
    });
    expect(res.status).toBe(201);
    await expectBackAtBench("strokes on 3E2 (coarse)");
  });

  it("a refused measurement leaves the head awaiting audit", async () => {
    await h.setStatus(db(), head.jobId, "awaiting_audit");
    const res = await sheetActions.saveMeasurement(initialActionState, h.form({ jobId: head.jobId, kind: "deck_flatness", value: "-1", unit: "mm" }));
    expect(res.ok).toBe(false);
    expect(await statusOf()).toBe("awaiting_audit");
  });
});

describe("the job page's hand-in controls", () => {
  it("list what is unfinished beside the hand-in, with the box to confirm, and offer the take-back", async () => {
    const { createElement } = await import("react");
    const { renderToStaticMarkup } = await import("react-dom/server");
    const { JobStatusActions } = await import("@/components/jobs/job-status-actions");
    const moves = [{ to: "awaiting_audit" as const, label: "Hand in for audit" }];
    const html = renderToStaticMarkup(
      createElement(JobStatusActions, { jobId: head.jobId, moves, unfinished: { seats: ["2I1", "3E2"], sheets: ["Intake camshaft cap torque: not set up"] }, canTakeBack: false }),
    );
    expect(html).toContain("Seats not settled in fine: <span class=\"font-mono\">2I1, 3E2</span>");
    expect(html).toContain("<li>Intake camshaft cap torque: not set up</li>");
    expect(html).toContain('name="confirmUnfinished" value="yes"');
    expect(html).not.toContain("Take it back to the bench");
    const finished = renderToStaticMarkup(createElement(JobStatusActions, { jobId: head.jobId, moves, unfinished: { seats: [], sheets: [] }, canTakeBack: false }));
    expect(finished).not.toContain("confirmUnfinished");
    const handedIn = renderToStaticMarkup(createElement(JobStatusActions, { jobId: head.jobId, moves: [], unfinished: null, canTakeBack: true }));
    expect(handedIn).toContain("Take it back to the bench");
  });
});
