// Audit in one place: a seat is approved without a comment or sent back with one, from the
// listen-back page; "Next seat" walks the head's seats awaiting a decision in head order; and
// "Approve every settled seat" approves a head's settled seats in one transaction, each with its
// own review and audit entry, skipping (and listing) those whose done-checks are not all passed
// unless a reason is given, and refusing the whole batch when the head changed meanwhile.
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { auditEntries, heads, jobs, reviews, seats } from "@/db/schema";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const review = await import("@/lib/review/service");
const actions = await import("@/lib/actions/review");
const { recordDoneCheck } = await import("@/lib/bench/done-checks");
const { initialActionState } = await import("@/lib/actions/state");
const { BadRequestError, ConflictError, ForbiddenError, errorResponse } = await import("@/lib/errors");
const { seatCode } = await import("@/lib/heads/layout");
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
beforeEach(() => {
  state.session = { user: { id: rhea.id } };
});

const count = async (table: typeof reviews | typeof auditEntries) => (await db().select({ n: sql<number>`count(*)::int` }).from(table))[0]!.n;
const jobOf = async (number: string) => (await db().select().from(jobs).where(eq(jobs.number, number)))[0]!;
/** A job's seats in head order, with their codes. */
async function seatsOf(number: string) {
  const job = await jobOf(number);
  const rows = await db()
    .select({ seat: seats })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .where(eq(heads.jobId, job.id))
    .orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position));
  return rows.map((r) => ({ ...r.seat, code: seatCode(r.seat) }));
}
/** A failed leak test recorded on a seat, as the bench records it (the demo's settled seats have all three passed). */
async function failLeakTest(seatId: string) {
  await recordDoneCheck(db(), rhea, { seatId, kind: "leak_test", result: "fail", note: "Solvent through in ten seconds." });
}
async function failure(p: Promise<unknown>): Promise<Error> {
  return p.then(
    () => {
      throw new Error("expected a refusal");
    },
    (e: unknown) => e as Error,
  );
}

describe("one seat, decided on the listen-back page", () => {
  it("is approved with no comment at all: the review stores no comment, the audit entry says so", async () => {
    const job = await jobOf("MHW-0144");
    const [first] = await seatsOf("MHW-0144");
    const r = await actions.submitSeatReview(
      initialActionState,
      h.form({ seatId: first!.id, jobId: job.id, decision: "approved", comment: "", expectedState: "settled" }),
    );
    expect(r).toMatchObject({ ok: true, message: `Seat ${first!.code} approved; it is read-only now.` });
    expect((await b.seatRow(db(), first!.id)).state).toBe("approved");
    const [row] = await db().select().from(reviews).where(eq(reviews.seatId, first!.id));
    expect(row).toMatchObject({ decision: "approved", comment: null, checksReason: null, reviewerId: rhea.id });
    const [entry] = await db().select().from(auditEntries).where(and(eq(auditEntries.entityId, first!.id), eq(auditEntries.action, "seat.approved")));
    expect(entry!.after).toMatchObject({ seat: first!.code, state: "approved", comment: null });
  });

  it("an approval without a comment still needs the checks reason when the done-checks are not all passed", async () => {
    const job = await jobOf("MHW-0144");
    const seat = (await seatsOf("MHW-0144"))[2]!;
    await failLeakTest(seat.id);
    const before = { reviews: await count(reviews), audit: await count(auditEntries) };
    const r = await actions.submitSeatReview(initialActionState, h.form({ seatId: seat.id, jobId: job.id, decision: "approved", comment: "" }));
    expect(r.ok).toBe(false);
    expect(r.fieldErrors.checksReason?.[0]).toBe(`Seat ${seat.code}'s done-checks are not all passed (leak test failed). Give a reason for approving it without them, or send it back.`);
    expect({ reviews: await count(reviews), audit: await count(auditEntries) }).toEqual(before);
    expect((await b.seatRow(db(), seat.id)).state).toBe("settled");
  });

  it("sending back needs a comment, from the form and from the service, and writes nothing without one", async () => {
    const job = await jobOf("MHW-0144");
    const seat = (await seatsOf("MHW-0144"))[1]!;
    const before = { reviews: await count(reviews), audit: await count(auditEntries) };
    const blank = await actions.submitSeatReview(initialActionState, h.form({ seatId: seat.id, jobId: job.id, decision: "sent_back", comment: "   " }));
    expect(blank.ok).toBe(false);
    expect(blank.fieldErrors.comment?.[0]).toBe("Write what to redo: a seat is sent back with a comment.");
    const err = await failure(review.reviewSeat(db(), rhea, { seatId: seat.id, decision: "sent_back", comment: "" }));
    expect(err).toBeInstanceOf(BadRequestError);
    expect(errorResponse(err).status).toBe(400);
    expect({ reviews: await count(reviews), audit: await count(auditEntries) }).toEqual(before);

    const ok = await actions.submitSeatReview(
      initialActionState,
      h.form({ seatId: seat.id, jobId: job.id, decision: "sent_back", comment: "Ring wide on the exhaust side; lap again fine.", expectedState: "settled" }),
    );
    expect(ok).toMatchObject({ ok: true, message: `Seat ${seat.code} sent back to the bench.` });
    const [row] = await db().select().from(reviews).where(eq(reviews.seatId, seat.id));
    expect(row).toMatchObject({ decision: "sent_back", comment: "Ring wide on the exhaust side; lap again fine." });
  });

  it("a seat that changed since the page showed it answers a conflict (409) and is left alone", async () => {
    const job = await jobOf("MHW-0144");
    const [first] = await seatsOf("MHW-0144"); // approved above
    // The supervisor's page still showed it settled; meanwhile it was approved (e.g. from another tab).
    const r = await actions.submitSeatReview(
      initialActionState,
      h.form({ seatId: first!.id, jobId: job.id, decision: "sent_back", comment: "Redo it please.", expectedState: "settled" }),
    );
    expect(r.ok).toBe(false);
    expect(r.message).toBe(
      `Seat ${first!.code} changed while you were looking at it: it was settled and is approved now. Look at it again before deciding.`,
    );
    const err = await failure(review.reviewSeat(db(), rhea, { seatId: first!.id, decision: "approved", expectedState: "settled" }));
    expect(err).toBeInstanceOf(ConflictError);
    expect(errorResponse(err).status).toBe(409);
    expect((await b.seatRow(db(), first!.id)).state).toBe("approved");
  });
});

describe("Next seat", () => {
  it("walks the head in order (cylinder, intake before exhaust), skipping seats decided, wrapping round, and says when none is left", async () => {
    const seatsNow = await seatsOf("MHW-0144");
    // 1I1 approved, 1E1 sent back (above); the rest settled.
    expect(seatsNow.map((s) => [s.code, s.state])).toEqual([
      ["1I1", "approved"],
      ["1E1", "sent_back"],
      ["2I1", "settled"],
      ["2E1", "settled"],
      ["3I1", "settled"],
      ["3E1", "settled"],
      ["4I1", "settled"],
      ["4E1", "settled"],
    ]);
    const byCode = new Map(seatsNow.map((s) => [s.code, s.id]));
    const next = async (code: string) => (await review.nextSeatToReview(db(), rhea.shopId, byCode.get(code)!))?.code ?? null;
    expect(await next("1I1")).toBe("2I1");
    expect(await next("1E1")).toBe("2I1");
    expect(await next("2I1")).toBe("2E1");
    expect(await next("3E1")).toBe("4I1");
    // From the last seat it goes round to the first one still awaiting a decision.
    expect(await next("4E1")).toBe("2I1");
    // A stalled seat awaits a decision too (a send-back); a seat still lapping does not.
    await b.setSeatState(db(), byCode.get("2I1")!, "lapping");
    await b.setSeatState(db(), byCode.get("2E1")!, "stalled");
    expect(await next("1I1")).toBe("2E1");
    // Another shop's caller learns nothing.
    expect(await review.nextSeatToReview(db(), "00000000-0000-4000-8000-000000000000", byCode.get("1I1")!)).toBeNull();
    // With every other seat decided, there is no next seat.
    for (const code of ["2I1", "2E1", "3I1", "3E1", "4I1", "4E1"]) await b.setSeatState(db(), byCode.get(code)!, "approved");
    expect(await next("3I1")).toBeNull();
    expect(await next("1I1")).toBeNull();
  });
});

describe("Approve every settled seat", () => {
  it("approves the seats with passed done-checks, each with its own review and audit entry, and lists the others with why", async () => {
    const job = await jobOf("MHW-0145");
    const all = await seatsOf("MHW-0145");
    // 1I1 and 2E1 keep the three passed checks the bench recorded; the others' leak tests failed.
    for (const [i, s] of all.entries()) if (i !== 0 && i !== 3) await failLeakTest(s.id);
    const before = { reviews: await count(reviews), audit: await count(auditEntries) };
    const f = h.form({ jobId: job.id, comment: "" });
    for (const s of all) f.append("seatIds", s.id);
    const r = await actions.submitApproveSettled(initialActionState, f);
    expect(r.ok).toBe(true);
    expect(r.saved!.approved).toEqual([all[0]!.code, all[3]!.code]);
    expect(r.saved!.skipped.map((s) => s.code)).toEqual(all.filter((_, i) => i !== 0 && i !== 3).map((s) => s.code));
    expect(r.saved!.skipped[0]!.why).toBe(
      "done-checks not all passed (leak test failed); approving it needs a reason",
    );
    expect(r.message).toBe(`2 seats approved: ${all[0]!.code}, ${all[3]!.code}. 6 seats left as they were (listed below).`);
    // Two reviews, two audit entries: one of each per seat approved.
    expect({ reviews: await count(reviews), audit: await count(auditEntries) }).toEqual({ reviews: before.reviews + 2, audit: before.audit + 2 });
    const entries = await db()
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.action, "seat.approved"), eq(auditEntries.jobId, job.id)));
    expect(entries.map((e) => e.entityId).sort()).toEqual([all[0]!.id, all[3]!.id].sort());
    for (const e of entries) expect(e.after).toMatchObject({ state: "approved", comment: null });
    const states = await db().select({ id: seats.id, state: seats.state }).from(seats).where(inArray(seats.id, all.map((s) => s.id)));
    expect(states.filter((s) => s.state === "approved").map((s) => s.id).sort()).toEqual([all[0]!.id, all[3]!.id].sort());
  });

  it("with a checks reason it approves the rest too, the reason and what was missing on each seat's own record", async () => {
    const job = await jobOf("MHW-0145");
    const rest = (await seatsOf("MHW-0145")).filter((s) => s.state === "settled");
    expect(rest).toHaveLength(6);
    const r = await review.approveSettledSeats(db(), rhea, {
      jobId: job.id,
      seatIds: rest.map((s) => s.id),
      comment: "Walked the head: curves flat, rings even.",
      checksReason: "Leak test done on the whole head at assembly.",
    });
    expect(r.approved).toEqual(rest.map((s) => s.code));
    expect(r.skipped).toEqual([]);
    const rows = await db().select().from(reviews).where(inArray(reviews.seatId, rest.map((s) => s.id)));
    expect(rows).toHaveLength(6);
    for (const row of rows) {
      expect(row).toMatchObject({
        decision: "approved",
        comment: "Walked the head: curves flat, rings even.",
        checksReason: "Leak test done on the whole head at assembly.",
      });
    }
    const entries = await db()
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.action, "seat.approved"), inArray(auditEntries.entityId, rest.map((s) => s.id))));
    expect(entries).toHaveLength(6);
    expect(entries[0]!.after).toMatchObject({
      checksReason: "Leak test done on the whole head at assembly.",
      checksShortfall: "leak test failed",
    });
  });

  it("refuses the whole batch with a conflict when a seat shown as settled changed meanwhile", async () => {
    const job = await jobOf("MHW-0143");
    const all = await seatsOf("MHW-0143");
    // Another tab approved 2I1 after this page was loaded (a reopened seat would be back to settled and not in the list).
    await b.setSeatState(db(), all[2]!.id, "approved");
    await b.setSeatState(db(), all[5]!.id, "sent_back");
    const before = { reviews: await count(reviews), audit: await count(auditEntries) };
    const f = h.form({ jobId: job.id, checksReason: "Checked at assembly." });
    for (const s of all) f.append("seatIds", s.id);
    const r = await actions.submitApproveSettled(initialActionState, f);
    expect(r.ok).toBe(false);
    expect(r.message).toBe(`Seats ${all[2]!.code} (now approved), ${all[5]!.code} (now sent back) changed since the page was loaded; nothing was approved. Look at the head again.`);
    expect({ reviews: await count(reviews), audit: await count(auditEntries) }).toEqual(before);
    const states = await db().select({ state: seats.state }).from(seats).where(inArray(seats.id, all.map((s) => s.id)));
    expect(states.filter((s) => s.state === "settled")).toHaveLength(6);
  });

  it("refuses with a conflict once the head is signed off, and refuses technicians and admins", async () => {
    const job = await jobOf("MHW-0143");
    const settled = (await seatsOf("MHW-0143")).filter((s) => s.state === "settled");
    await b.setJob(db(), "MHW-0143", { status: "signed_off" });
    const before = { reviews: await count(reviews), audit: await count(auditEntries) };
    const err = await failure(review.approveSettledSeats(db(), rhea, { jobId: job.id, seatIds: settled.map((s) => s.id), checksReason: "At assembly." }));
    expect(err).toBeInstanceOf(ConflictError);
    expect(err.message).toBe("Job MHW-0143 is signed off; reopen the head before approving seats.");
    expect(errorResponse(err).status).toBe(409);
    await b.setJob(db(), "MHW-0143", { status: "awaiting_audit" });
    for (const who of [ines, admin]) {
      await expect(review.approveSettledSeats(db(), who, { jobId: job.id, seatIds: settled.map((s) => s.id) })).rejects.toBeInstanceOf(ForbiddenError);
      state.session = { user: { id: who.id } };
      const f = h.form({ jobId: job.id });
      for (const s of settled) f.append("seatIds", s.id);
      expect((await actions.submitApproveSettled(initialActionState, f)).ok).toBe(false);
    }
    expect({ reviews: await count(reviews), audit: await count(auditEntries) }).toEqual(before);
  });

  it("validates its form: a job and at least one seat, ids that are ids, seats of that job only", async () => {
    const job = await jobOf("MHW-0143");
    const none = await actions.submitApproveSettled(initialActionState, h.form({ jobId: job.id }));
    expect(none.ok).toBe(false);
    expect(none.fieldErrors.seatIds?.[0]).toBe("There is no settled seat to approve on this head.");
    const odd = h.form({ jobId: "x" });
    odd.append("seatIds", "not-a-seat");
    const bad = await actions.submitApproveSettled(initialActionState, odd);
    expect(Object.keys(bad.fieldErrors).sort()).toEqual(["jobId", "seatIds.0"].sort());
    const other = (await seatsOf("MHW-0141"))[0]!;
    const err = await failure(review.approveSettledSeats(db(), rhea, { jobId: job.id, seatIds: [other.id] }));
    expect(errorResponse(err).status).toBe(404);
  });
});
