// The done-checks besides the sound (contact ring, marking-compound test, leak test of the port):
// recorded per seat through the server action with who and when, an optional photo of the seat,
// the ring's width from the seat's measurements; refused for the wrong person, an approved seat
// or a signed-off head with nothing written; a technician's check takes a handed-in head back to
// the bench; lapping again makes the checks count no more; and a supervisor approving a seat
// without them must give a reason, kept with the review and in the audit trail.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { and, desc, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { auditEntries, jobs, reviews, seatChecks, seatCheckKind, seatCheckResult } from "@/db/schema";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-done-checks-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const { resetBlobStore } = await import("@/lib/storage");
const { saveDoneCheck } = await import("@/lib/actions/done-checks");
const { submitSeatReview } = await import("@/lib/actions/review");
const { initialActionState } = await import("@/lib/actions/state");
const checks = await import("@/lib/bench/done-checks");
const words = await import("@/lib/bench/done-check-words");
const bench = await import("@/lib/bench/service");
const sheets = await import("@/lib/heads/sheets");
const review = await import("@/lib/review/service");
const { getReviews } = await import("@/db/queries/reviews");
const { addSeatPhoto } = await import("@/lib/storage/photos");
const { BadRequestError, ConflictError } = await import("@/lib/errors");
const route = await import("@/app/api/seats/[seatId]/checks/route");
const h = await import("../sheets/helpers");
const b = await import("../bench/helpers");
const { jpegHead } = await import("../storage/fixtures");

type Actor = Awaited<ReturnType<typeof h.actorOf>>;
type Head = Awaited<ReturnType<typeof h.demoHead>>;
const db = () => state.t!.db;
let ines: Actor, dov: Actor, rhea: Actor, admin: Actor;
let own: Head, audit: Head;

beforeAll(async () => {
  resetServerEnvCache();
  resetBlobStore();
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  ines = await h.actorOf(db(), "ines@millrace.example");
  dov = await h.actorOf(db(), "dov@millrace.example");
  rhea = await h.actorOf(db(), "rhea@millrace.example");
  admin = await h.actorOf(db(), "admin@millrace.example");
  own = await h.demoHead(db(), "MHW-0141");
  audit = await h.demoHead(db(), "MHW-0143");
});
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});
beforeEach(async () => {
  state.session = null;
  await b.setJob(db(), "MHW-0141", { status: "at_bench" });
});

const signInAs = (a: Actor | null) => {
  state.session = a ? { user: { id: a.id } } : null;
};
const seat = (code: string) => own.seatByCode.get(code)!;
const save = (o: Record<string, string>) => saveDoneCheck(initialActionState, h.form(o));
const rowsOf = (seatId: string) => db().select().from(seatChecks).where(eq(seatChecks.seatId, seatId));
const lastAudit = async (entityId: string) =>
  (await db().select().from(auditEntries).where(eq(auditEntries.entityId, entityId)).orderBy(desc(auditEntries.id)).limit(1))[0];
const everything = async () =>
  (
    (await db().execute(
      sql`select (select count(*) from seat_checks)::int as checks, (select count(*) from audit_entries)::int as audit, (select count(*) from reviews)::int as reviews, (select string_agg(state::text, ',' order by id) from seats) as seats, (select string_agg(status::text, ',' order by id) from jobs) as jobs`,
    )) as unknown as { rows: unknown[] }
  ).rows[0];
const once = (bytes: Uint8Array) =>
  new ReadableStream<Uint8Array>({
    start(c) {
      c.enqueue(bytes);
      c.close();
    },
  });

describe("the words and the schema", () => {
  it("name the same kinds and results", () => {
    expect([...words.DONE_CHECK_KINDS]).toEqual(seatCheckKind.enumValues);
    expect([...words.DONE_CHECK_RESULTS]).toEqual(seatCheckResult.enumValues);
  });

  it("count the latest record of each kind, never a stale one, and name what is missing or failed", () => {
    const rec = (kind: (typeof words.DONE_CHECK_KINDS)[number], result: "pass" | "fail", at: string, stale = false) => ({
      id: randomUUID(),
      kind,
      result,
      port: null,
      contactWidthMm: null,
      note: null,
      photoUrl: null,
      recordedBy: "Ines",
      recordedAt: at,
      stale,
    });
    const s = checks.summarise([
      rec("contact_ring", "fail", "2026-12-05T10:00:00.000Z"),
      rec("contact_ring", "pass", "2026-12-05T11:00:00.000Z"),
      rec("leak_test", "pass", "2026-12-05T12:00:00.000Z"),
      rec("leak_test", "fail", "2026-12-05T12:30:00.000Z"),
      rec("marking_compound", "pass", "2026-12-05T09:00:00.000Z", true),
    ]);
    expect(s.latest.contact_ring?.result).toBe("pass");
    expect(s.latest.leak_test?.result).toBe("fail");
    expect(s.latest.marking_compound).toBeNull();
    expect(s).toMatchObject({ missing: ["marking_compound"], failed: ["leak_test"], complete: false });
    expect(checks.shortfallText(s)).toBe("marking-compound test not recorded; leak test failed");
  });
});

describe("recording done-checks at the bench", () => {
  it("records the three checks on a seat with who, when, the leak test's port and an audit entry each", async () => {
    signInAs(ines);
    const id = seat("3I1");
    const ring = await save({ seatId: id, kind: "contact_ring", result: "pass", note: "Even grey all round" });
    expect(ring).toMatchObject({ ok: true, message: "Contact ring on seat 3I1: pass recorded." });
    await save({ seatId: id, kind: "marking_compound", result: "pass" });
    const leak = await save({ seatId: id, kind: "leak_test", result: "pass", note: "" });
    expect(leak.ok).toBe(true);
    const c = leak.checks!;
    expect(c).toMatchObject({ code: "3I1", port: "intake port of cylinder 3", missing: [], failed: [], complete: true });
    expect(c.latest.contact_ring).toMatchObject({ result: "pass", note: "Even grey all round", recordedBy: "Ines Marlow", stale: false });
    expect(c.latest.leak_test).toMatchObject({ port: "intake", note: null });
    const rows = await rowsOf(id);
    expect(rows).toHaveLength(3);
    expect(rows.every((r) => r.recordedById === ines.id)).toBe(true);
    expect(rows.find((r) => r.kind === "leak_test")!.port).toBe("intake");
    expect(rows.filter((r) => r.kind !== "leak_test").every((r) => r.port === null)).toBe(true);
    const entries = await db().select().from(auditEntries).where(and(eq(auditEntries.entityId, id), eq(auditEntries.action, "seat.check_recorded")));
    expect(entries).toHaveLength(3);
    expect(entries.find((e) => (e.after as { kind: string }).kind === "leak_test")).toMatchObject({
      actorId: ines.id,
      jobId: own.jobId,
      after: { seat: "3I1", kind: "leak_test", result: "pass", port: "intake port of cylinder 3" },
    });
  });

  it("takes the contact ring's width from the seat's latest measurement, and a pass outside the specification needs a note", async () => {
    signInAs(ines);
    const id = seat("3E1");
    // Varda VX18 exhaust seats: 1.2–1.6 mm (invented demo figures, db/seed.ts).
    const before = (await checks.getSeatDoneChecks(db(), ines, id)).width;
    expect(before).toMatchObject({ measuredMm: null, specMin: 1.2, specMax: 1.6, specSource: "library", verdict: null });
    const measure = (mm: number) =>
      sheets.recordMeasurement(db(), ines, { jobId: own.jobId, kind: "seat_contact_width", seatId: id, valueSi: mm, enteredUnit: "mm", method: null, spec: null, note: null });
    await measure(1.45);
    const ok = await save({ seatId: id, kind: "contact_ring", result: "pass" });
    expect(ok.checks!.width).toMatchObject({ measuredMm: expect.closeTo(1.45, 5), verdict: "within_spec" });
    const [row] = await rowsOf(id);
    expect(row!.contactWidthMm).toBeCloseTo(1.45, 5);
    expect(row!.measurementId).not.toBeNull();

    await measure(2.1);
    const snap = await everything();
    const refused = await save({ seatId: id, kind: "contact_ring", result: "pass" });
    expect(refused.ok).toBe(false);
    expect(refused.message).toBe("The measured contact width 2.10 mm is above 1.20 mm–1.60 mm: record a fail, or say in the note why the ring passes.");
    expect(refused.fieldErrors.note).toBeDefined();
    expect(await everything()).toEqual(snap);
    expect((await save({ seatId: id, kind: "contact_ring", result: "fail" })).ok).toBe(true);
    expect((await save({ seatId: id, kind: "contact_ring", result: "pass", note: "Maker allows 2.2 mm after a recut" })).ok).toBe(true);
    expect((await rowsOf(id)).map((r) => r.contactWidthMm?.toFixed(2)).sort()).toEqual(["1.45", "2.10", "2.10"]);
  });

  it("keeps a photo of the seat with the check, and refuses a photo of another seat", async () => {
    signInAs(ines);
    const photo = await addSeatPhoto(db(), ines, seat("3E2"), once(jpegHead));
    const res = await save({ seatId: seat("3E2"), kind: "marking_compound", result: "fail", photoId: photo.id, note: "Broken at 4 o'clock" });
    expect(res.checks!.latest.marking_compound).toMatchObject({ result: "fail", photoUrl: `/api/photos/${photo.id}`, note: "Broken at 4 o'clock" });
    expect(res.checks!.failed).toEqual(["marking_compound"]);
    const snap = await everything();
    const other = await save({ seatId: seat("4I1"), kind: "marking_compound", result: "pass", photoId: photo.id });
    expect(other).toMatchObject({ ok: false, message: "That photo is not one of this seat's. Take the photo again." });
    expect(other.fieldErrors.photoId).toBeDefined();
    expect(await everything()).toEqual(snap);
  });

  it("refuses another technician's job, an admin, an approved seat, a signed-off head and bad input, writing nothing", async () => {
    const snap = await everything();
    signInAs(null);
    expect(await save({ seatId: seat("3I2"), kind: "leak_test", result: "pass" })).toMatchObject({ ok: false, message: "Sign in to continue." });
    signInAs(dov);
    expect((await save({ seatId: seat("3I2"), kind: "leak_test", result: "pass" })).message).toMatch(/assigned to another technician/);
    signInAs(admin);
    expect((await save({ seatId: seat("3I2"), kind: "leak_test", result: "pass" })).ok).toBe(false);
    signInAs(ines);
    const bad = await save({ seatId: seat("3I2"), kind: "sniff_test", result: "maybe", note: "a\u0000b" });
    expect(bad.ok).toBe(false);
    expect(Object.keys(bad.fieldErrors).sort()).toEqual(["kind", "note", "result"]);
    expect(await everything()).toEqual(snap);

    await b.setSeatState(db(), seat("3I2"), "approved");
    await expect(checks.recordDoneCheck(db(), ines, { seatId: seat("3I2"), kind: "leak_test", result: "pass" })).rejects.toThrow(ConflictError);
    expect((await save({ seatId: seat("3I2"), kind: "leak_test", result: "pass" })).message).toBe(
      "Seat 3I2 is approved: its done-checks are read-only until a supervisor reopens it.",
    );
    await b.setSeatState(db(), seat("3I2"), "waiting");
    await b.setJob(db(), "MHW-0141", { status: "signed_off" });
    expect((await save({ seatId: seat("3I2"), kind: "leak_test", result: "pass" })).message).toBe("Job MHW-0141 is signed off; its seats are read-only.");
    await b.setJob(db(), "MHW-0141", { status: "at_bench" });
    const withoutState = { ...(snap as Record<string, unknown>) };
    const now = { ...((await everything()) as Record<string, unknown>) };
    delete withoutState.jobs;
    delete now.jobs;
    expect(now).toEqual(withoutState);
  });

  it("takes a head awaiting audit back to the bench when the technician records a check, in the audit trail", async () => {
    await b.setJob(db(), "MHW-0141", { status: "awaiting_audit" });
    signInAs(ines);
    expect((await save({ seatId: seat("4E1"), kind: "leak_test", result: "pass" })).ok).toBe(true);
    expect((await db().select().from(jobs).where(eq(jobs.id, own.jobId)))[0]!.status).toBe("at_bench");
    expect(await lastAudit(own.jobId)).toMatchObject({ action: "job.back_to_bench", after: { status: "at_bench", work: "leak test on seat 4E1" } });
  });

  it("counts checks no more once the seat is lapped again", async () => {
    signInAs(ines);
    const id = seat("4E2");
    for (const kind of words.DONE_CHECK_KINDS) await save({ seatId: id, kind, result: "pass" });
    expect((await checks.getSeatDoneChecks(db(), ines, id)).complete).toBe(true);
    await new Promise((r) => setTimeout(r, 5));
    const sessionId = randomUUID();
    await bench.startSession(db(), ines, id, b.sessionBody("fine", "phone-done-checks-1", sessionId));
    await bench.saveStrokes(db(), ines, sessionId, b.strokeInputs([3, 2]));
    const after = await checks.getSeatDoneChecks(db(), ines, id);
    expect(after).toMatchObject({ complete: false, missing: ["contact_ring", "marking_compound", "leak_test"] });
    expect(after.history.every((r) => r.stale)).toBe(true);
  });

  it("answers a seat's done-checks over GET for anyone of the shop, and 404 for an id that is no seat", async () => {
    signInAs(dov);
    const res = await route.GET(b.jsonRequest(`/api/seats/${seat("3I1")}/checks`, undefined, "GET"), { params: Promise.resolve({ seatId: seat("3I1") }) });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ code: "3I1", complete: true });
    const missing = randomUUID();
    const none = await route.GET(b.jsonRequest(`/api/seats/${missing}/checks`, undefined, "GET"), { params: Promise.resolve({ seatId: missing }) });
    expect(none.status).toBe(404);
  });
});

describe("approving a seat without its done-checks", () => {
  it("is refused without a reason, writing nothing, and with one keeps it with the review and in the audit entry", async () => {
    const id = seat("2E1");
    await b.setSeatState(db(), id, "settled");
    signInAs(rhea);
    const snap = await everything();
    const form = (o: Record<string, string> = {}) => h.form({ seatId: id, jobId: own.jobId, decision: "approved", comment: "Band looks even", ...o });
    const refused = await submitSeatReview(initialActionState, form());
    expect(refused.ok).toBe(false);
    expect(refused.message).toBe(
      "Seat 2E1's done-checks are not all passed (contact ring not recorded; marking-compound test not recorded; leak test not recorded). Give a reason for approving it without them, or send it back.",
    );
    expect(refused.fieldErrors.checksReason).toBeDefined();
    expect((await submitSeatReview(initialActionState, form({ checksReason: " x " }))).fieldErrors.checksReason).toBeDefined();
    await expect(review.reviewSeat(db(), rhea, { seatId: id, decision: "approved", comment: "Band looks even" })).rejects.toThrow(BadRequestError);
    expect(await everything()).toEqual(snap);

    const ok = await submitSeatReview(initialActionState, form({ checksReason: "Leak-tested with the head assembled on the bench" }));
    expect(ok).toMatchObject({ ok: true });
    const [row] = await db().select().from(reviews).where(and(eq(reviews.seatId, id), eq(reviews.decision, "approved")));
    expect(row!.checksReason).toBe("Leak-tested with the head assembled on the bench");
    expect(await lastAudit(id)).toMatchObject({
      action: "seat.approved",
      after: {
        checksReason: "Leak-tested with the head assembled on the bench",
        checksShortfall: "contact ring not recorded; marking-compound test not recorded; leak test not recorded",
      },
    });
    const listed = (await getReviews(db(), rhea.shopId, own.jobId)).find((r) => r.seatId === id);
    expect(listed?.checksReason).toBe("Leak-tested with the head assembled on the bench");
  });

  it("needs no reason when every check passed, and keeps none given", async () => {
    // MHW-0143's seats were handed in with their done-checks (db/seed.ts).
    const all = await checks.getJobDoneChecks(db(), rhea.shopId, audit.jobId);
    expect([...all.values()].every((c) => c.complete)).toBe(true);
    const id = audit.seatByCode.get("2I1")!;
    await review.reviewSeat(db(), rhea, { seatId: id, decision: "approved", comment: "Even ring", checksReason: "Not needed here" });
    const [row] = await db().select().from(reviews).where(eq(reviews.seatId, id));
    expect(row!.checksReason).toBeNull();
  });

  it("asks for a reason when a check failed, even with all three recorded", async () => {
    signInAs(ines);
    const id = seat("2I2");
    await save({ seatId: id, kind: "contact_ring", result: "pass" });
    await save({ seatId: id, kind: "marking_compound", result: "pass" });
    await save({ seatId: id, kind: "leak_test", result: "fail", note: "Wet at the chamber side" });
    await b.setSeatState(db(), id, "settled");
    const err = await review.reviewSeat(db(), rhea, { seatId: id, decision: "approved", comment: "Band even" }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(BadRequestError);
    expect((err as Error).message).toMatch(/\(leak test failed\)/);
    // Sending back needs no reason beyond the comment.
    expect((await review.reviewSeat(db(), rhea, { seatId: id, decision: "sent_back", comment: "Leak at the chamber side" })).state).toBe("sent_back");
  });
});
