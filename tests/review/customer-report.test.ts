// The customer's report end to end on PGlite: the sign-off lists what the head's record lacks and
// refuses to sign off without a reason; a complete head needs none; signing off makes a hashed,
// expiring link and queues a mail greeting the customer, with the link and the report as a PDF;
// the public route answers 200 with that job's report only, 410 when expired or revoked, 404 when
// unknown or altered, and every opening and revocation is in the audit trail.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import {
  auditEntries,
  customerLinks,
  customers,
  jobs,
  mailOutbox,
  measurements,
  reviews,
  seatChecks,
  seatPhotos,
  torqueSheets,
  torqueTicks,
  users,
} from "@/db/schema";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
process.env.NEXTAUTH_URL = "http://grindfade.test";

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { reviewHead, reviewSeat, reopenHead } = await import("@/lib/review/service");
const { headCompleteness } = await import("@/lib/review/completeness");
const { hashLinkToken, openCustomerLink, revokeCustomerLink } = await import("@/lib/report/customer-links");
const { processDueMail } = await import("@/lib/mail/outbox");
const { startFakeSmtp } = await import("@/lib/mail/fake-smtp");
const { submitHeadReview, submitCustomerLinkRevoke } = await import("@/lib/actions/review");
const { initialActionState } = await import("@/lib/actions/state");
const route = await import("@/app/r/[token]/route");
const h = await import("../sheets/helpers");

type TestDatabase = Awaited<ReturnType<typeof freshPglite>>;
let t: TestDatabase;
const db = () => t.db;

beforeEach(async () => {
  await t?.cleanup();
  t = await freshPglite();
  state.t = t;
  state.session = null;
  await seedDemoShop(t.db);
});
afterAll(async () => {
  await t?.cleanup();
});

const open = (token: string) => route.GET(new Request(`http://grindfade.test/r/${token}`), { params: Promise.resolve({ token }) });

async function approveAll(jobNumber: string) {
  const rhea = await h.actorOf(db(), "rhea@millrace.example");
  const head = await h.demoHead(db(), jobNumber);
  for (const seatId of head.seatByCode.values())
    await reviewSeat(db(), rhea, { seatId, decision: "approved", comment: "Even grey ring.", checksReason: "Checked with the head assembled." });
  return { rhea, head };
}

/** Makes MHW-0144's record complete: every done-check passed, a photo of each seat, every journal measured, the torque sheet finished. */
async function completeRecord(jobNumber: string) {
  const head = await h.demoHead(db(), jobNumber);
  const ines = await h.userId(db(), "ines@millrace.example");
  const seatRows = [...head.seatByCode.entries()];
  for (const [code, seatId] of seatRows) {
    const port = code.includes("I") ? "intake" : "exhaust";
    await db().insert(seatChecks).values([
      { seatId, kind: "contact_ring", result: "pass", recordedById: ines },
      { seatId, kind: "marking_compound", result: "pass", recordedById: ines },
      { seatId, kind: "leak_test", result: "pass", port, recordedById: ines },
    ]);
    await db().insert(seatPhotos).values({ seatId, key: `photos/${seatId}.jpg`, type: "image/jpeg", bytes: 1234, takenById: ines });
  }
  for (const c of head.camshafts) {
    for (const journalId of c.journalIds)
      await db().insert(measurements).values({ headId: head.headId, kind: "journal_clearance", journalId, value: 0.05, enteredUnit: "mm", method: "diameters", recordedById: ines });
    const order = Array.from({ length: c.journalIds.length * 2 }, (_, i) => `${Math.floor(i / 2) + 1}${i % 2 ? "b" : "a"}`);
    const [sheet] = await db()
      .insert(torqueSheets)
      .values({ headId: head.headId, camshaftId: c.id, capCount: c.journalIds.length, boltsPerCap: 2, boltOrder: order, orderSource: "centre-out", finalNm: 10, stageFractions: [0.5, 1], createdById: ines })
      .returning();
    for (const stage of [1, 2]) for (const boltId of order) await db().insert(torqueTicks).values({ sheetId: sheet!.id, stage, boltId, tickedById: ines });
  }
  return head;
}

describe("sign-off knows what is missing", () => {
  it("lists the seats, clearances, torque sheet, done-checks and photos a seeded head lacks", async () => {
    const [job] = await db().select().from(jobs).where(eq(jobs.number, "MHW-0143"));
    const shopId = job!.shopId;
    // The seed records every settled seat's done-checks as passed; a later failed leak test on 1I1 counts.
    const head = await h.demoHead(db(), "MHW-0143");
    const ines = await h.userId(db(), "ines@millrace.example");
    await db().insert(seatChecks).values({ seatId: head.seatByCode.get("1I1")!, kind: "leak_test", result: "fail", port: "intake", recordedById: ines, recordedAt: new Date(Date.now() + 1000) });
    const before = await headCompleteness(db(), shopId, job!.id);
    expect(before.gaps.map((g) => g.kind)).toEqual(["seats", "clearance", "torque", "done_checks", "photos"]);
    expect(before.unapprovedSeatCodes).toHaveLength(8);
    expect(before.gaps.find((g) => g.kind === "clearance")!.text).toBe("Journal clearances not measured: 5 of 5.");
    expect(before.gaps.find((g) => g.kind === "torque")!.text).toMatch(/^Cap torque sheet not set up: /);
    expect(before.gaps.find((g) => g.kind === "done_checks")!.text).toBe("Done-checks not recorded or not passed: 1I1.");
    expect(before.gaps.find((g) => g.kind === "done_checks")!.details).toEqual([expect.stringMatching(/^1I1: leak test failed$/i)]);
    expect(before.customer).toEqual({ name: "Saltmarsh Vintage Motor Club", greeting: "Ebbe Marrow", email: "secretary@saltmarsh-vmc.example" });

    await approveAll("MHW-0143");
    const after = await headCompleteness(db(), shopId, job!.id);
    expect(after.unapprovedSeatCodes).toEqual([]);
    expect(after.needsReason).toBe(true);
  });

  it("refuses to sign off an incomplete head without a reason and leaves everything as it was", async () => {
    const { rhea, head } = await approveAll("MHW-0143");
    const snapshot = await h.snapshot(db());
    const err = await reviewHead(db(), rhea, { jobId: head.jobId, decision: "approved", comment: "All eight seats approved." }).catch((e: unknown) => e);
    expect(err).toMatchObject({ status: 400, fieldErrors: { incompleteReason: [expect.stringMatching(/record is incomplete .*Journal clearances not measured/)] } });
    expect(await h.snapshot(db())).toEqual(snapshot);
    expect(await db().select().from(customerLinks)).toHaveLength(0);
    expect(await db().select().from(mailOutbox)).toHaveLength(0);

    // Sending back needs no reason, whatever the record lacks.
    const back = await reviewHead(db(), rhea, { jobId: head.jobId, decision: "sent_back", comment: "Measure the journals first." });
    expect(back.status).toBe("at_bench");
  });

  it("the form's action says what is missing and keeps the job awaiting audit; with a reason it signs off and stores the reason", async () => {
    const { rhea, head } = await approveAll("MHW-0143");
    state.session = { user: { id: rhea.id } };
    const refused = await submitHeadReview(initialActionState, h.form({ jobId: head.jobId, decision: "approved", comment: "Signed off.", incompleteReason: "" }));
    expect(refused.ok).toBe(false);
    expect(refused.fieldErrors.incompleteReason?.[0]).toMatch(/Give a reason for signing it off anyway/);
    const tooShort = await submitHeadReview(initialActionState, h.form({ jobId: head.jobId, decision: "approved", comment: "Signed off.", incompleteReason: "x" }));
    expect(tooShort.fieldErrors.incompleteReason?.[0]).toMatch(/at least 3 characters/);
    const [still] = await db().select().from(jobs).where(eq(jobs.id, head.jobId));
    expect(still!.status).toBe("awaiting_audit");

    const reason = "Customer collects today; journals measured on the car at refit.";
    const ok = await submitHeadReview(initialActionState, h.form({ jobId: head.jobId, decision: "approved", comment: "Seats all approved.", incompleteReason: reason }));
    expect(ok).toMatchObject({ ok: true, message: "Job MHW-0143 signed off. Report sent to secretary@saltmarsh-vmc.example." });
    const [review] = await db().select().from(reviews).where(and(eq(reviews.jobId, head.jobId), eq(reviews.decision, "approved")));
    const headReview = (await db().select().from(reviews).where(eq(reviews.jobId, head.jobId))).find((r) => r.seatId === null)!;
    expect(review).toBeTruthy();
    expect(headReview.incompleteReason).toBe(reason);
    expect(headReview.incompleteItems).toEqual(expect.arrayContaining(["Journal clearances not measured: 5 of 5."]));
    const [entry] = await db().select().from(auditEntries).where(eq(auditEntries.action, "job.signed_off"));
    expect(entry!.after).toMatchObject({ status: "signed_off", incompleteReason: reason, incompleteItems: headReview.incompleteItems });
  });

  it("a complete head is signed off without a reason, and a reason sent anyway is not stored", async () => {
    await completeRecord("MHW-0144");
    const { rhea, head } = await approveAll("MHW-0144");
    const record = await headCompleteness(db(), rhea.shopId, head.jobId);
    expect(record.gaps).toEqual([]);
    expect(record.needsReason).toBe(false);
    const res = await reviewHead(db(), rhea, { jobId: head.jobId, decision: "approved", comment: "Complete record.", incompleteReason: "Not needed." });
    expect(res.status).toBe("signed_off");
    const headReview = (await db().select().from(reviews).where(eq(reviews.jobId, head.jobId))).find((r) => r.seatId === null)!;
    expect(headReview.incompleteReason).toBeNull();
    expect(headReview.incompleteItems).toBeNull();
    // A business customer is greeted by its contact person.
    const [mail] = await db().select().from(mailOutbox).where(eq(mailOutbox.jobId, head.jobId));
    expect(mail!.text.startsWith("Dear Tamsin Oduya,\n")).toBe(true);
    expect(mail!.text).not.toContain("record incomplete");
  });
});

describe("the customer's link and mail", () => {
  async function signOff(jobNumber = "MHW-0143") {
    const { rhea, head } = await approveAll(jobNumber);
    const res = await reviewHead(db(), rhea, { jobId: head.jobId, decision: "approved", comment: "Seats all approved.", incompleteReason: "Journals measured at refit." });
    const token = res.report!.linkUrl.split("/r/")[1]!;
    return { rhea, head, res, token };
  }

  it("stores only the token's hash, expires in 30 days, and puts the link and a PDF in the mail", async () => {
    const { res, token, head, rhea } = await signOff();
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(res.report!.linkUrl).toBe(`http://grindfade.test/r/${token}`);
    const [link] = await db().select().from(customerLinks);
    expect(link!.tokenHash).toBe(hashLinkToken(token));
    expect(link!.tokenHash).not.toContain(token);
    const days = (link!.expiresAt.getTime() - link!.createdAt.getTime()) / 86_400_000;
    expect(days).toBeCloseTo(30, 5);

    const [mail] = await db().select().from(mailOutbox);
    expect(mail!.recipients.sort()).toEqual(["secretary@saltmarsh-vmc.example", rhea.email].sort());
    expect(mail!.text.startsWith("Dear Ebbe Marrow,\n")).toBe(true);
    expect(mail!.text).toContain(`http://grindfade.test/r/${token}`);
    expect(mail!.text).not.toContain(`/jobs/${head.jobId}/report`);
    expect(mail!.text).toContain("Reason: Journals measured at refit.");
    expect(mail!.attachmentName).toBe("head-report-MHW-0143.pdf");
    expect(mail!.attachmentType).toBe("application/pdf");
    expect(mail!.attachment!.subarray(0, 5).toString("latin1")).toBe("%PDF-");
  });

  it("delivers the PDF as an attachment over SMTP, and the PDF holds the shop, verdicts, sign-off reason and page numbers", async () => {
    await signOff();
    const fake = await startFakeSmtp({ port: 0 });
    try {
      const transport = nodemailer.createTransport({ host: "127.0.0.1", port: fake.port, secure: false, ignoreTLS: true });
      expect(await processDueMail(db(), transport)).toMatchObject({ sent: 1 });
      const raw = fake.messages()[0]!.raw;
      expect(raw).toMatch(/Content-Type: application\/pdf; name=head-report-MHW-0143\.pdf/);
      expect(raw).toMatch(/Content-Disposition: attachment; filename=head-report-MHW-0143\.pdf/);
    } finally {
      await fake.close();
    }
    const [mail] = await db().select().from(mailOutbox);
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-pdf-"));
    const file = path.join(dir, "report.pdf");
    fs.writeFileSync(file, mail!.attachment!);
    // Debian's poppler-utils reads the PDF back as text (pdftotext) and as page images (pdftoppm).
    const text = execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
    expect(text).toContain("Millrace Head Works");
    expect(text).toContain("Unit 4, Weir Yard");
    expect(text).toContain("01632 960 414");
    expect(text).toContain("Head report MHW-0143");
    expect(text).toContain("Saltmarsh Vintage Motor Club");
    expect(text).toMatch(/Settled at stroke \d+/);
    expect(text).toContain("Journals measured at refit.");
    const pages = Number(/Pages:\s+(\d+)/.exec(execFileSync("pdfinfo", [file], { encoding: "utf8" }))![1]);
    expect(pages).toBeGreaterThanOrEqual(2);
    expect(text).toContain(`Page ${pages} of ${pages}`);
    execFileSync("pdftoppm", ["-png", "-r", "30", file, path.join(dir, "page")]);
    expect(fs.readdirSync(dir).filter((f) => f.endsWith(".png"))).toHaveLength(pages);
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it("a customer with no e-mail: the panel's record says so, the mail goes to the supervisor only, and the screen says so", async () => {
    const { rhea, head } = await approveAll("MHW-0145");
    const record = await headCompleteness(db(), rhea.shopId, head.jobId);
    expect(record.customer).toEqual({ name: "Perrin Ashdown", greeting: "Perrin Ashdown", email: null });
    state.session = { user: { id: rhea.id } };
    const ok = await submitHeadReview(initialActionState, h.form({ jobId: head.jobId, decision: "approved", comment: "Seats approved.", incompleteReason: "Walk-in; collects today." }));
    expect(ok.message).toBe(`Job MHW-0145 signed off. Perrin Ashdown has no e-mail on file: the report went to you only (${rhea.email}).`);
    const [mail] = await db().select().from(mailOutbox);
    expect(mail!.recipients).toEqual([rhea.email]);
    expect(mail!.text.startsWith("Dear Perrin Ashdown,\n")).toBe(true);
  });

  it("a private customer given an e-mail is greeted by name and mailed", async () => {
    const [job] = await db().select().from(jobs).where(eq(jobs.number, "MHW-0145"));
    await db().update(customers).set({ email: "perrin@ashdown.example" }).where(eq(customers.id, job!.customerId));
    const { res } = await signOff("MHW-0145");
    expect(res.report!.customerEmail).toBe("perrin@ashdown.example");
    const [mail] = await db().select().from(mailOutbox);
    expect(mail!.recipients).toContain("perrin@ashdown.example");
    expect(mail!.html).toContain("<p>Dear Perrin Ashdown,</p>");
  });

  it("opens the job's report without a session, explains it in plain words, shows nothing of another job, and audits the opening", async () => {
    const { token, head } = await signOff();
    state.session = null;
    const res = await open(token);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^text\/html/);
    expect(res.headers.get("cache-control")).toBe("no-store");
    const html = await res.text();
    expect(html).toContain("Millrace Head Works");
    expect(html).toContain("Head report MHW-0143");
    expect(html).toContain("Onset contrast");
    expect(html).toContain("Settled at stroke 12");
    expect(html).toContain("Fade curve");
    expect(html).toMatch(/Settled at stroke \d+/);
    expect(html).toContain("Journals measured at refit.");
    expect(html).not.toMatch(/<script/i);
    // Nothing of any other job: not their numbers, customers or engines' notes.
    const others = await db().select({ number: jobs.number, id: jobs.id, notes: jobs.notes }).from(jobs);
    for (const o of others.filter((o) => o.id !== head.jobId)) {
      expect(html).not.toContain(o.number);
      expect(html).not.toContain(o.id);
      if (o.notes) expect(html).not.toContain(o.notes);
    }
    for (const c of await db().select().from(customers)) if (c.name !== "Saltmarsh Vintage Motor Club") expect(html).not.toContain(c.name);
    const opened = await db().select().from(auditEntries).where(eq(auditEntries.action, "customer_link.opened"));
    expect(opened).toHaveLength(1);
    expect(opened[0]).toMatchObject({ actorId: null, entityType: "customer_link", jobId: head.jobId });
    await open(token);
    expect(await db().select().from(auditEntries).where(eq(auditEntries.action, "customer_link.opened"))).toHaveLength(2);
  });

  it("answers 404 for an altered or made-up token, with one sentence and nothing of the report", async () => {
    const { token } = await signOff();
    const altered = `${token.slice(0, -1)}${token.endsWith("A") ? "B" : "A"}`;
    for (const bad of [altered, "A".repeat(43), "short", `${token}x`, "../../jobs", "%00"]) {
      const res = await open(bad);
      expect(res.status, bad).toBe(404);
      const html = await res.text();
      expect(html).toContain("There is no report at this address.");
      expect(html).not.toContain("MHW-0143");
      expect(html).not.toContain("Millrace");
    }
    expect(await db().select().from(auditEntries).where(eq(auditEntries.entityType, "customer_link"))).toHaveLength(1); // the creation only
  });

  it("answers 410 once expired, without the report, and audits the refused opening", async () => {
    const { token } = await signOff();
    const [link] = await db().select().from(customerLinks);
    const later = new Date(link!.expiresAt.getTime() + 1000);
    expect((await openCustomerLink(db(), token, later)).kind).toBe("gone");
    await db().update(customerLinks).set({ expiresAt: new Date(Date.now() - 1000), createdAt: new Date(Date.now() - 31 * 86_400_000) });
    const res = await open(token);
    expect(res.status).toBe(410);
    const html = await res.text();
    expect(html).toContain("This report link has expired.");
    expect(html).not.toContain("MHW-0143");
    expect(html).not.toContain("Settled");
    const refused = await db().select().from(auditEntries).where(eq(auditEntries.action, "customer_link.refused"));
    expect(refused.map((r) => r.after)).toEqual([{ why: "expired" }, { why: "expired" }]);
  });

  it("a supervisor revokes the link (audited); it then answers 410; others cannot revoke it", async () => {
    const { token, rhea, head } = await signOff();
    const [link] = await db().select().from(customerLinks);
    // Technicians and admins are refused, and nothing changes.
    const ines = await h.actorOf(db(), "ines@millrace.example");
    await expect(revokeCustomerLink(db(), ines, { linkId: link!.id })).rejects.toMatchObject({ status: 403 });
    const [admin] = await db().select().from(users).where(eq(users.role, "admin"));
    state.session = { user: { id: admin!.id } };
    expect((await submitCustomerLinkRevoke(initialActionState, h.form({ jobId: head.jobId, linkId: link!.id }))).ok).toBe(false);
    expect((await open(token)).status).toBe(200);

    state.session = { user: { id: rhea.id } };
    const bad = await submitCustomerLinkRevoke(initialActionState, h.form({ jobId: head.jobId, linkId: "not-a-link" }));
    expect(bad).toMatchObject({ ok: false, fieldErrors: { linkId: [expect.any(String)] } });
    const done = await submitCustomerLinkRevoke(initialActionState, h.form({ jobId: head.jobId, linkId: link!.id }));
    expect(done).toMatchObject({ ok: true, message: "The customer's link to MHW-0143's report is revoked; it no longer opens." });
    const [entry] = await db().select().from(auditEntries).where(eq(auditEntries.action, "customer_link.revoked"));
    expect(entry).toMatchObject({ actorId: rhea.id, entityId: link!.id, jobId: head.jobId });
    const res = await open(token);
    expect(res.status).toBe(410);
    const html = await res.text();
    expect(html).toContain("This report link has been withdrawn by the workshop.");
    expect(html).not.toContain("MHW-0143");
    // Twice is refused plainly.
    const again = await submitCustomerLinkRevoke(initialActionState, h.form({ jobId: head.jobId, linkId: link!.id }));
    expect(again.message).toMatch(/already revoked/);
  });

  it("reopening the head revokes its live links", async () => {
    const { token, rhea, head } = await signOff();
    await reopenHead(db(), rhea, { jobId: head.jobId, reason: "Customer reports a leak on cylinder 2." });
    expect((await open(token)).status).toBe(410);
    const [entry] = await db().select().from(auditEntries).where(eq(auditEntries.action, "customer_link.revoked"));
    expect(entry!.after).toMatchObject({ why: "head reopened" });
  });
});
