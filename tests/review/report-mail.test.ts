// Signing off a head queues its report for the customer and the supervisor in the same
// transaction, and the outbox delivers it over SMTP to the local catcher.
import net from "node:net";
import { eq } from "drizzle-orm";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { customers, jobs, mailOutbox, seats, heads } from "@/db/schema";
import { seedDemoShop } from "@/db/seed";
import { startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";
import { processDueMail } from "@/lib/mail/outbox";
import { reviewHead, reviewSeat } from "@/lib/review/service";
import { freshPglite, type TestDatabase } from "../helpers/db";
import { actorOf } from "../sheets/helpers";

let t: TestDatabase;
let fake: FakeSmtp;

async function freePort(): Promise<number> {
  const srv = net.createServer();
  await new Promise<void>((r) => srv.listen(0, "127.0.0.1", () => r()));
  const port = (srv.address() as net.AddressInfo).port;
  await new Promise<void>((r) => srv.close(() => r()));
  return port;
}

beforeAll(async () => {
  t = await freshPglite();
  await seedDemoShop(t.db);
  fake = await startFakeSmtp({ port: await freePort() });
});
afterAll(async () => {
  await fake?.close();
  await t?.cleanup();
});

describe("head report mail", () => {
  it("is queued at sign-off and delivered to the customer and the supervisor", async () => {
    const rhea = await actorOf(t.db, "rhea@millrace.example");
    const [job] = await t.db.select().from(jobs).where(eq(jobs.number, "MHW-0143"));
    const [customer] = await t.db.select().from(customers).where(eq(customers.id, job!.customerId));
    const seatRows = await t.db.select({ id: seats.id }).from(seats).innerJoin(heads, eq(heads.id, seats.headId)).where(eq(heads.jobId, job!.id));

    // Approving seats queues nothing; only the head's sign-off sends the record.
    for (const s of seatRows) await reviewSeat(t.db, rhea, { seatId: s.id, decision: "approved", comment: "Even grey ring, leak test dry." });
    expect(await t.db.select().from(mailOutbox)).toHaveLength(0);

    await reviewHead(t.db, rhea, { jobId: job!.id, decision: "approved", comment: "All eight seats lapped and checked.", incompleteReason: "Journals measured at refit." });
    const queued = await t.db.select().from(mailOutbox);
    expect(queued).toHaveLength(1);
    expect(queued[0]!.kind).toBe("head_report");
    expect(queued[0]!.recipients.sort()).toEqual([customer!.email!, rhea.email].sort());
    // The customer has no account: the mail links to the report's public address, not the shop's page.
    expect(queued[0]!.text).toMatch(/\/r\/[A-Za-z0-9_-]{43}\n/);
    expect(queued[0]!.text).not.toContain(`/jobs/${job!.id}/report`);
    expect(queued[0]!.text).toContain("All eight seats lapped and checked.");

    const transport = nodemailer.createTransport({ host: "127.0.0.1", port: fake.port, secure: false, ignoreTLS: true });
    await processDueMail(t.db, transport);
    const [after] = await t.db.select().from(mailOutbox).where(eq(mailOutbox.id, queued[0]!.id));
    expect(after!.status).toBe("sent");
    const delivered = fake.messages();
    expect(delivered).toHaveLength(1);
    expect(delivered[0]!.raw).toMatch(/Subject: Head report MHW-0143: signed off/);
    expect(delivered[0]!.raw).toContain(customer!.email!);
  });
});
