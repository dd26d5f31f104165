// The outbox sends through a real SMTP conversation with the local catcher, retries with growing
// delays, gives up after five failures in a row, and never sends one message twice. Its attempts
// count every send tried, the one that went out included; its failures drive the back-off.
import net from "node:net";
import { eq } from "drizzle-orm";
import nodemailer from "nodemailer";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { mailOutbox } from "@/db/schema";
import { startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";
import { enqueueMail, MAX_ATTEMPTS, processDueMail, retryMail, SENDING_LEASE_MS } from "@/lib/mail/outbox";
import { freshPglite, type TestDatabase } from "../helpers/db";

let t: TestDatabase;
let fake: FakeSmtp;

/** A port nothing listens on: taken from the system, then released. */
async function closedPort(): Promise<number> {
  const srv = net.createServer();
  await new Promise<void>((r) => srv.listen(0, "127.0.0.1", () => r()));
  const port = (srv.address() as net.AddressInfo).port;
  await new Promise<void>((r) => srv.close(() => r()));
  return port;
}

const transportTo = (port: number) =>
  nodemailer.createTransport({ host: "127.0.0.1", port, secure: false, ignoreTLS: true, connectionTimeout: 3_000 });

/** The value of one header in a raw message (headers end at the first blank line). */
function header(raw: string, name: string): string | null {
  const head = raw.split(/\r?\n\r?\n/)[0]!.replace(/\r?\n[ \t]+/g, " ");
  const m = new RegExp(`^${name}:\\s*(.*)$`, "im").exec(head);
  return m ? m[1]!.trim() : null;
}

const rowOf = async (id: string) => (await t.db.select().from(mailOutbox).where(eq(mailOutbox.id, id)))[0]!;

const report = {
  kind: "head-report",
  recipients: ["customer@example.test", "supervisor@example.test"],
  subject: "Head report for job 1042",
  html: "<p>Your cylinder head is ready.</p>",
  text: "Your cylinder head is ready.",
};

beforeAll(async () => {
  t = await freshPglite();
});
afterAll(async () => {
  await t?.cleanup();
});
beforeEach(async () => {
  await t.db.delete(mailOutbox);
  fake = await startFakeSmtp({ port: 0, host: "127.0.0.1" });
});
afterEach(async () => {
  await fake.close();
});

describe("mail outbox", () => {
  it("sends a queued message to every recipient and marks it sent", async () => {
    const id = await enqueueMail(t.db, report);
    const before = await rowOf(id);
    expect(before.status).toBe("queued");

    const result = await processDueMail(t.db, transportTo(fake.port), new Date(Date.now() + 1000), {
      from: "Grindfade <no-reply@grindfade.local>",
    });
    expect(result).toEqual({ sent: 1, retrying: 0, failed: 0 });

    const got = fake.messages();
    expect(got).toHaveLength(1);
    expect(got[0]!.to.sort()).toEqual(["customer@example.test", "supervisor@example.test"]);
    expect(header(got[0]!.raw, "To")).toBe("customer@example.test, supervisor@example.test");
    expect(header(got[0]!.raw, "Subject")).toBe("Head report for job 1042");
    expect(header(got[0]!.raw, "From")).toContain("no-reply@grindfade.local");
    expect(got[0]!.raw).toContain("Your cylinder head is ready.");

    const after = await rowOf(id);
    expect(after.status).toBe("sent");
    expect(after.sentAt).toBeInstanceOf(Date);
    // One send tried, and it went out: one attempt, no failure.
    expect(after.attempts).toBe(1);
    expect(after.failures).toBe(0);
    expect(after.lastError).toBeNull();
  });

  it("leaves a message that is not yet due alone", async () => {
    const id = await enqueueMail(t.db, report);
    const result = await processDueMail(t.db, transportTo(fake.port), new Date(Date.now() - 60 * 60_000));
    expect(result.sent).toBe(0);
    expect(fake.messages()).toHaveLength(0);
    expect((await rowOf(id)).status).toBe("queued");
  });

  it("retries after 1, 5, 25 and 125 minutes, then gives up as failed; send again re-queues it", async () => {
    const id = await enqueueMail(t.db, report);
    const dead = transportTo(await closedPort());
    let now = new Date(Date.now() + 1000);

    const first = await processDueMail(t.db, dead, now);
    expect(first).toEqual({ sent: 0, retrying: 1, failed: 0 });
    let row = await rowOf(id);
    expect(row.status).toBe("queued");
    expect(row.attempts).toBe(1);
    expect(row.failures).toBe(1);
    expect(row.lastError).toMatch(/ECONNREFUSED|connect/i);
    expect(row.nextAttemptAt.getTime()).toBe(now.getTime() + 60_000);

    // Not due again until the delay has passed.
    expect(await processDueMail(t.db, dead, new Date(now.getTime() + 59_000))).toEqual({ sent: 0, retrying: 0, failed: 0 });

    const delays: number[] = [];
    for (let attempt = 2; attempt <= MAX_ATTEMPTS; attempt++) {
      now = new Date((await rowOf(id)).nextAttemptAt.getTime());
      await processDueMail(t.db, dead, now);
      row = await rowOf(id);
      expect(row.attempts).toBe(attempt);
      expect(row.failures).toBe(attempt);
      delays.push((row.nextAttemptAt.getTime() - now.getTime()) / 60_000);
    }
    expect(delays.slice(0, 3)).toEqual([5, 25, 125]);
    expect(row.status).toBe("failed");
    expect(row.lastError).toBeTruthy();

    // A failed message is never picked up again on its own, however late it gets.
    expect(await processDueMail(t.db, dead, new Date(now.getTime() + 365 * 86_400_000))).toEqual({
      sent: 0,
      retrying: 0,
      failed: 0,
    });

    const retryAt = new Date(now.getTime() + 1000);
    expect(await retryMail(t.db, id, retryAt)).toBe(true);
    row = await rowOf(id);
    expect(row.status).toBe("queued");
    // Send again clears the failures for the back-off; the sends already tried still count.
    expect(row.failures).toBe(0);
    expect(row.attempts).toBe(MAX_ATTEMPTS);
    expect(row.nextAttemptAt.getTime()).toBe(retryAt.getTime());

    // After send again, one more failure waits one minute again, as a new message would.
    await processDueMail(t.db, dead, retryAt);
    row = await rowOf(id);
    expect(row).toMatchObject({ status: "queued", attempts: MAX_ATTEMPTS + 1, failures: 1 });
    expect(row.nextAttemptAt.getTime()).toBe(retryAt.getTime() + 60_000);

    expect(await processDueMail(t.db, transportTo(fake.port), row.nextAttemptAt)).toEqual({ sent: 1, retrying: 0, failed: 0 });
    row = await rowOf(id);
    expect(row).toMatchObject({ status: "sent", attempts: MAX_ATTEMPTS + 2, failures: 1 });
    expect(fake.messages()).toHaveLength(1);
  });

  it("refuses to re-queue a message that has not failed", async () => {
    const id = await enqueueMail(t.db, report);
    expect(await retryMail(t.db, id)).toBe(false);
    await processDueMail(t.db, transportTo(fake.port), new Date(Date.now() + 1000));
    expect(await retryMail(t.db, id)).toBe(false);
    expect((await rowOf(id)).status).toBe("sent");
  });

  it("sends each message once when two workers run at the same time", async () => {
    const ids: string[] = [];
    for (let i = 0; i < 6; i++) ids.push(await enqueueMail(t.db, { ...report, subject: `Head report ${i}` }));
    const now = new Date(Date.now() + 1000);
    const [a, b] = await Promise.all([
      processDueMail(t.db, transportTo(fake.port), now),
      processDueMail(t.db, transportTo(fake.port), now),
    ]);
    expect(a.sent + b.sent).toBe(6);
    const subjects = fake.messages().map((m) => header(m.raw, "Subject"));
    expect(subjects).toHaveLength(6);
    expect(new Set(subjects).size).toBe(6);
    // Each went out once, and each counts exactly that one send.
    for (const id of ids) expect(await rowOf(id)).toMatchObject({ status: "sent", attempts: 1, failures: 0 });
  });

  it("counts a send whose worker died mid-way: picked up again after the lease, it shows two attempts", async () => {
    const id = await enqueueMail(t.db, report);
    const start = new Date(Date.now() + 1000);
    // A worker claims it and dies before recording anything (as a killed process would).
    const hung = { sendMail: () => new Promise<never>(() => {}) };
    void processDueMail(t.db, hung, start);
    await expect.poll(async () => (await rowOf(id)).status).toBe("sending");
    expect((await rowOf(id)).attempts).toBe(1);
    // Not due while the lease runs; due again once it has passed.
    expect((await processDueMail(t.db, transportTo(fake.port), new Date(start.getTime() + SENDING_LEASE_MS - 1000))).sent).toBe(0);
    expect((await processDueMail(t.db, transportTo(fake.port), new Date(start.getTime() + SENDING_LEASE_MS + 1000))).sent).toBe(1);
    expect(await rowOf(id)).toMatchObject({ status: "sent", attempts: 2, failures: 0 });
  });

  it("refuses bad addresses, no recipients and over-long subjects, and writes nothing", async () => {
    await expect(enqueueMail(t.db, { ...report, recipients: ["customer@example.test", "not an address"] })).rejects.toThrow(
      /valid e-mail/,
    );
    await expect(enqueueMail(t.db, { ...report, recipients: [] })).rejects.toThrow(/at least one recipient/);
    await expect(enqueueMail(t.db, { ...report, subject: "x".repeat(201) })).rejects.toThrow(/200 characters/);
    expect(await t.db.select().from(mailOutbox)).toHaveLength(0);

    // Exactly 200 is allowed; addresses are trimmed, lower-cased and de-duplicated.
    const id = await enqueueMail(t.db, {
      ...report,
      subject: "y".repeat(200),
      recipients: [" Customer@Example.test", "customer@example.test"],
    });
    expect((await rowOf(id)).recipients).toEqual(["customer@example.test"]);
  });
});
