// The background sender delivers due mail through the configured server and shrugs off a
// database or mail server that is down, so it can never take the web server with it.
import { eq } from "drizzle-orm";
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import type { Db } from "@/db/client";
import { mailOutbox } from "@/db/schema";
import { startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";
import { enqueueMail } from "@/lib/mail/outbox";
import { startMailWorker } from "@/lib/mail/worker";
import { freshPglite, type TestDatabase } from "../helpers/db";

let t: TestDatabase;
let fake: FakeSmtp;
const savedUrl = process.env.SMTP_URL;

beforeAll(async () => {
  t = await freshPglite();
  fake = await startFakeSmtp({ port: 0, host: "127.0.0.1" });
  // Point the worker at this test's catcher, never at the shared development port.
  process.env.SMTP_URL = `smtp://127.0.0.1:${fake.port}`;
});
afterAll(async () => {
  if (savedUrl === undefined) delete process.env.SMTP_URL;
  else process.env.SMTP_URL = savedUrl;
  await fake?.close();
  await t?.cleanup();
});
afterEach(() => vi.restoreAllMocks());

const mail = {
  kind: "head-report",
  recipients: ["customer@example.test"],
  subject: "Head report from the worker",
  html: "<p>Ready</p>",
  text: "Ready",
};

describe("mail worker", () => {
  it("sends due mail on its first pass", async () => {
    const id = await enqueueMail(t.db, mail);
    const worker = startMailWorker(async () => t.db, 60_000);
    try {
      await worker.runOnce();
    } finally {
      worker.stop();
    }
    const [row] = await t.db.select().from(mailOutbox).where(eq(mailOutbox.id, id));
    expect(row!.status).toBe("sent");
    expect(fake.messages().some((m) => /^Subject: Head report from the worker$/m.test(m.raw))).toBe(true);
  });

  it("never throws when the database cannot be reached", async () => {
    const warn = vi.spyOn(console, "warn").mockImplementation(() => {});
    const worker = startMailWorker(() => Promise.reject(new Error("database is down")), 60_000);
    try {
      await expect(worker.runOnce()).resolves.toBeUndefined();
    } finally {
      worker.stop();
    }
    expect(warn.mock.calls.flat().join(" ")).toMatch(/database is down/);
  });

  it("never throws on a bad SMTP_URL", async () => {
    const warn = vi.spyOn(console, "warn").mockImplementation(() => {});
    process.env.SMTP_URL = "http://wrong.example";
    const worker = startMailWorker(async () => t.db as Db, 60_000);
    try {
      await expect(worker.runOnce()).resolves.toBeUndefined();
    } finally {
      worker.stop();
      process.env.SMTP_URL = `smtp://127.0.0.1:${fake.port}`;
    }
    expect(warn.mock.calls.flat().join(" ")).toMatch(/SMTP_URL/);
  });
});
