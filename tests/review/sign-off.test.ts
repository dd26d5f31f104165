// Sign-off: only a supervisor approves, sends back or reopens; an approved seat or a signed-off
// head refuses strokes and edits with a conflict (HTTP 409) until it is reopened; every decision
// lands with a reviews row and an audit entry, or not at all.
import { randomUUID } from "node:crypto";
import { and, desc, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { auditEntries, jobs, lappingSessions, reviews, seats } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const review = await import("@/lib/review/service");
const actions = await import("@/lib/actions/review");
const bench = await import("@/lib/bench/service");
const sheets = await import("@/lib/heads/sheets");
const { getReviews } = await import("@/db/queries/reviews");
const { initialActionState } = await import("@/lib/actions/state");
const { ConflictError, ForbiddenError, errorResponse } = await import("@/lib/errors");
const h = await import("../sheets/helpers");
const b = await import("../bench/helpers");

const db = () => state.t!.db;
type Actor = Awaited<ReturnType<typeof h.actorOf>>;
let rhea: Actor, ines: Actor, admin: Actor;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  rhea = await h.actorOf(db(), "rhea@millrace.example");
  ines = await h.actorOf(db(), "ines@millrace.example");
  admin = await h.actorOf(db(), "admin@millrace.example");
});
afterAll(async () => {
  await state.t?.cleanup();
});

function signInAs(a: Actor | null) {
  state.session = a ? { user: { id: a.id } } : null;
}
const n = async (table: typeof reviews | typeof auditEntries) => (await db().select({ n: sql<number>`count(*)::int` }).from(table))[0]!.n;
const jobOf = async (number: string) => (await db().select().from(jobs).where(eq(jobs.number, number)))[0]!;
const lastAudit = async (entityId: string) =>
  (await db().select().from(auditEntries).where(eq(auditEntries.entityId, entityId)).orderBy(desc(auditEntries.id)).limit(1))[0];

/** A status (409) from the shared error mapping, so the HTTP answer is checked as well as the class. */
async function expectConflict(p: Promise<unknown>, message: RegExp) {
  const err = await p.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(ConflictError);
  expect((err as Error).message).toMatch(message);
  expect(errorResponse(err).status).toBe(409);
}

describe("who may sign off", () => {
  beforeEach(() => signInAs(null));

  it("a technician and an admin are refused, and nothing is written", async () => {
    const seatId = await b.seatId(db(), "MHW-0141", "1I1");
    const before = { reviews: await n(reviews), audit: await n(auditEntries) };
    await expect(review.reviewSeat(db(), ines, { seatId, decision: "approved", comment: "Looks fine to me" })).rejects.toBeInstanceOf(ForbiddenError);
    signInAs(ines);
    const tech = await actions.submitSeatReview(initialActionState, h.form({ seatId, jobId: (await jobOf("MHW-0141")).id, decision: "approved", comment: "Looks fine to me" }));
    expect(tech).toMatchObject({ ok: false, message: "Only a supervisor can audit and sign off work." });
    // Admins hold jobs:audit to read the trail, but the service refuses them a decision.
    signInAs(admin);
    const byAdmin = await actions.submitSeatReview(initialActionState, h.form({ seatId, jobId: (await jobOf("MHW-0141")).id, decision: "approved", comment: "Looks fine to me" }));
    expect(byAdmin.ok).toBe(false);
    expect(byAdmin.message).toMatch(/Only a supervisor can sign off/);
    await expect(review.reopenHead(db(), admin, { jobId: (await jobOf("MHW-0143")).id, reason: "Customer asked" })).rejects.toBeInstanceOf(ForbiddenError);
    expect((await b.seatRow(db(), seatId)).state).toBe("settled");
    expect({ reviews: await n(reviews), audit: await n(auditEntries) }).toEqual(before);
  });

  it("the action asks for a comment of at least 3 characters and a reason to reopen", async () => {
    signInAs(rhea);
    const seatId = await b.seatId(db(), "MHW-0141", "1I1");
    const jobId = (await jobOf("MHW-0141")).id;
    const short = await actions.submitSeatReview(initialActionState, h.form({ seatId, jobId, decision: "approved", comment: " ok " }));
    expect(short.ok).toBe(false);
    expect(short.fieldErrors.comment?.[0]).toMatch(/at least 3/);
    const noReason = await actions.submitSeatReopen(initialActionState, h.form({ seatId, jobId }));
    expect(Object.keys(noReason.fieldErrors)).toEqual(["reason"]);
    expect((await b.seatRow(db(), seatId)).state).toBe("settled");
  });
});

describe("a seat's sign-off", () => {
  beforeEach(() => signInAs(null));

  it("only a settled seat can be approved; a lapping seat can be sent back", async () => {
    const lapping = await b.seatId(db(), "MHW-0141", "2I1");
    const waiting = await b.seatId(db(), "MHW-0141", "4E2");
    await expectConflict(review.reviewSeat(db(), rhea, { seatId: lapping, decision: "approved", comment: "Early sign-off" }), /2I1 is still lapping; only a settled seat/);
    await expectConflict(review.reviewSeat(db(), rhea, { seatId: waiting, decision: "sent_back", comment: "Nothing to see" }), /no lapping to send back/);
    const sent = await review.reviewSeat(db(), rhea, { seatId: lapping, decision: "sent_back", comment: "Grey band is patchy at 3 o'clock" });
    expect(sent.state).toBe("sent_back");
    expect(await lastAudit(lapping)).toMatchObject({ action: "seat.sent_back", actorId: rhea.id, before: { state: "lapping" }, after: { state: "sent_back" } });
    // A new session on a sent-back seat puts it back to lapping (the bench service's rule).
    await bench.startSession(db(), ines, lapping, b.sessionBody("fine", "phone-ines-rv1"));
    expect((await b.seatRow(db(), lapping)).state).toBe("lapping");
  });

  it("a supervisor approves a settled seat: state, review row and audit entry land together", async () => {
    signInAs(rhea);
    const seatId = await b.seatId(db(), "MHW-0141", "1I1");
    const jobId = (await jobOf("MHW-0141")).id;
    const res = await actions.submitSeatReview(initialActionState, h.form({ seatId, jobId, decision: "approved", comment: "Even grey band all round, 1.2 mm" }));
    expect(res).toMatchObject({ ok: true, message: "Seat 1I1 approved; it is read-only now." });
    expect((await b.seatRow(db(), seatId)).state).toBe("approved");
    const [row] = await db().select().from(reviews).where(and(eq(reviews.seatId, seatId), eq(reviews.decision, "approved")));
    expect(row).toMatchObject({ jobId, reviewerId: rhea.id, comment: "Even grey band all round, 1.2 mm" });
    expect(await lastAudit(seatId)).toMatchObject({
      action: "seat.approved",
      actorId: rhea.id,
      jobId,
      before: { seat: "1I1", state: "settled" },
      after: { seat: "1I1", state: "approved", comment: "Even grey band all round, 1.2 mm" },
    });
    const history = await getReviews(db(), rhea.shopId, jobId);
    expect(history[0]).toMatchObject({ seatCode: "1I1", decision: "approved", reviewerName: "Rhea Castellan" });
  });

  it("an approved seat refuses new sessions, strokes, seat measurements and valve edits with 409", async () => {
    const seatId = await b.seatId(db(), "MHW-0141", "1I1");
    const jobId = (await jobOf("MHW-0141")).id;
    const before = await b.counts(db());
    await expectConflict(bench.startSession(db(), ines, seatId, b.sessionBody("fine", "phone-ines-rv2")), /1I1 is signed off/);
    const [old] = await db().select().from(lappingSessions).where(eq(lappingSessions.seatId, seatId)).limit(1);
    await expectConflict(bench.saveStrokes(db(), ines, old!.id, b.strokeInputs([0.5, 0.4])), /1I1 is signed off/);
    await expectConflict(
      sheets.recordMeasurement(db(), ines, {
        jobId,
        kind: "seat_contact_width",
        seatId,
        valueSi: 1.3,
        enteredUnit: "mm",
        method: null,
        spec: null,
        note: null,
      }),
      /1I1 is approved: it is read-only/,
    );
    const head = await h.demoHead(db(), "MHW-0141");
    const valve = await h.valveIn(db(), head, "1I1");
    await expectConflict(
      sheets.updateValveIdentity(db(), ines, { jobId, valveId: valve.id, tag: "NEW-1", partNumber: null, serial: null }),
      /1I1 is approved/,
    );
    expect(await b.counts(db())).toEqual(before);
  });

  it("reopening needs a reason, returns the seat to settled, and strokes are accepted again", async () => {
    const seatId = await b.seatId(db(), "MHW-0141", "1I1");
    await expect(review.reopenSeat(db(), rhea, { seatId, reason: "  " })).rejects.toThrow(/reason/);
    const res = await review.reopenSeat(db(), rhea, { seatId, reason: "Customer reports a smoky start; recheck 1I1" });
    expect(res.state).toBe("settled");
    expect(await lastAudit(seatId)).toMatchObject({ action: "seat.reopened", before: { state: "approved" }, after: { state: "settled" } });
    const [row] = await db().select().from(reviews).where(and(eq(reviews.seatId, seatId), eq(reviews.decision, "reopened")));
    expect(row?.comment).toBe("Customer reports a smoky start; recheck 1I1");
    const sessionId = randomUUID();
    await bench.startSession(db(), ines, seatId, b.sessionBody("fine", "phone-ines-rv3", sessionId));
    const saved = await bench.saveStrokes(db(), ines, sessionId, b.strokeInputs([0.6, 0.5]));
    expect(saved.accepted).toBe(2);
    await expectConflict(review.reopenSeat(db(), rhea, { seatId, reason: "Again" }), /not approved; there is nothing to reopen/);
  });
});

describe("the head's sign-off", () => {
  it("is refused while seats are unapproved, naming them, and from a job not awaiting audit", async () => {
    const job = await jobOf("MHW-0143");
    const head = await h.demoHead(db(), "MHW-0143");
    const codes = [...head.seatByCode.keys()];
    expect(codes).toHaveLength(8);
    await review.reviewSeat(db(), rhea, { seatId: head.seatByCode.get("1I1")!, decision: "approved", comment: "Band even" });
    const before = { reviews: await n(reviews), audit: await n(auditEntries) };
    await expectConflict(
      review.reviewHead(db(), rhea, { jobId: job.id, decision: "approved", comment: "All good" }),
      /MHW-0143 cannot be signed off: seats 1E1, 2I1, 2E1, 3I1, 3E1, 4I1, 4E1 are not approved yet/,
    );
    expect((await jobOf("MHW-0143")).status).toBe("awaiting_audit");
    expect({ reviews: await n(reviews), audit: await n(auditEntries) }).toEqual(before);
    const atBench = await jobOf("MHW-0141");
    await expectConflict(
      review.reviewHead(db(), rhea, { jobId: atBench.id, decision: "approved", comment: "All good" }),
      /MHW-0141 is at the bench; a head is signed off only while it is awaiting audit/,
    );
  });

  it("approving every seat then the head signs the job off; its sheets are read-only; reopening puts it at the bench", async () => {
    const job = await jobOf("MHW-0143");
    const head = await h.demoHead(db(), "MHW-0143");
    for (const [code, seatId] of head.seatByCode) {
      if (code === "1I1") continue;
      await review.reviewSeat(db(), rhea, { seatId, decision: "approved", comment: `Seat ${code} band even` });
    }
    signInAs(rhea);
    // The seeded head has no clearances, torque sheet or photos, so signing off gives a reason.
    const res = await actions.submitHeadReview(
      initialActionState,
      h.form({ jobId: job.id, decision: "approved", comment: "Head signed off for collection", incompleteReason: "Club measures the journals at refit." }),
    );
    expect(res).toMatchObject({ ok: true, message: "Job MHW-0143 signed off. Report sent to secretary@saltmarsh-vmc.example." });
    expect((await jobOf("MHW-0143")).status).toBe("signed_off");
    expect(await lastAudit(job.id)).toMatchObject({ action: "job.signed_off", actorId: rhea.id, before: { status: "awaiting_audit" }, after: { status: "signed_off" } });
    const [headReview] = await db().select().from(reviews).where(and(eq(reviews.jobId, job.id), sql`${reviews.seatId} is null`));
    expect(headReview).toMatchObject({ decision: "approved", comment: "Head signed off for collection" });

    // A signed-off head: head-wide measurements and valve edits are refused too.
    await expectConflict(
      sheets.recordMeasurement(db(), ines, { jobId: job.id, kind: "deck_flatness", seatId: null, valueSi: 0.03, enteredUnit: "mm", method: null, spec: null, note: null }),
      /MHW-0143 is signed off/,
    );
    const valve = await h.valveIn(db(), head, "2E1");
    await expectConflict(sheets.updateValveIdentity(db(), ines, { jobId: job.id, valveId: valve.id, tag: "X-9", partNumber: null, serial: null }), /MHW-0143 is signed off/);
    // A seat of a signed-off head cannot be reopened on its own.
    await expectConflict(review.reopenSeat(db(), rhea, { seatId: head.seatByCode.get("2E1")!, reason: "Recheck" }), /reopen the head first/);

    await expectConflict(review.reviewHead(db(), rhea, { jobId: job.id, decision: "approved", comment: "Twice" }), /MHW-0143 is signed off/);
    const reopened = await review.reopenHead(db(), rhea, { jobId: job.id, reason: "Club wants the exhaust seats rechecked" });
    expect(reopened.status).toBe("at_bench");
    expect(await lastAudit(job.id)).toMatchObject({ action: "job.reopened", before: { status: "signed_off" }, after: { status: "at_bench", reason: "Club wants the exhaust seats rechecked" } });
    await expectConflict(review.reopenHead(db(), rhea, { jobId: job.id, reason: "Again" }), /only a signed-off head can be reopened/);
  });

  it("sending the head back from awaiting audit puts it at the bench", async () => {
    const job = await jobOf("MHW-0143");
    await db().update(jobs).set({ status: "awaiting_audit" }).where(eq(jobs.id, job.id));
    const res = await review.reviewHead(db(), rhea, { jobId: job.id, decision: "sent_back", comment: "Spring heights not recorded" });
    expect(res.status).toBe("at_bench");
    expect(await lastAudit(job.id)).toMatchObject({ action: "job.sent_back", before: { status: "awaiting_audit" }, after: { status: "at_bench" } });
    const states = await db().select({ state: seats.state }).from(seats).where(eq(seats.headId, (await h.demoHead(db(), "MHW-0143")).headId));
    expect(new Set(states.map((s) => s.state))).toEqual(new Set(["approved"]));
  });
});
