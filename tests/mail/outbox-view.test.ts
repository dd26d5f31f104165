// Opening a message on the outbox page: what was sent (subject, recipients, both bodies, the links
// in it) for the admin's own shop only; kinds by name, not by code.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { jobs, shops, users } from "@/db/schema";
import { seedDemoShop } from "@/db/seed";
import { enqueueMail, getShopMail, linksInMail, listShopMail, mailKindName } from "@/lib/mail/outbox";
import { freshPglite, type TestDatabase } from "../helpers/db";

let t: TestDatabase;
beforeAll(async () => {
  t = await freshPglite();
  await seedDemoShop(t.db);
});
afterAll(async () => {
  await t?.cleanup();
});

describe("a message opened from the outbox", () => {
  it("is the shop's own, with its job, who queued it and the bodies as stored; another shop gets nothing", async () => {
    const [job] = await t.db.select().from(jobs).where(eq(jobs.number, "MHW-0141"));
    const [rhea] = await t.db.select().from(users).where(eq(users.email, "rhea@millrace.example"));
    const html = '<p>Tamsin,</p><p>See the <a href="https://shop.example/r/abc?x=1&amp;y=2">head report</a>.</p><script>alert(1)</script>';
    const id = await enqueueMail(t.db, {
      kind: "head_report",
      jobId: job!.id,
      recipients: ["tamsin@corrinvale.example"],
      subject: "Head report MHW-0141: signed off",
      html,
      text: "Tamsin,\n\nThe full record is at https://shop.example/r/abc?x=1&y=2",
      createdById: rhea!.id,
    });
    const mail = await getShopMail(t.db, job!.shopId, id);
    expect(mail).toMatchObject({
      id,
      kind: "head_report",
      subject: "Head report MHW-0141: signed off",
      recipients: ["tamsin@corrinvale.example"],
      html,
      jobNumber: "MHW-0141",
      createdByName: rhea!.name,
      attempts: 0,
      failures: 0,
      status: "queued",
    });
    const [other] = await t.db.insert(shops).values({ name: "Another shop" }).returning({ id: shops.id });
    expect(await getShopMail(t.db, other!.id, id)).toBeNull();
    expect(await getShopMail(t.db, job!.shopId, "00000000-0000-4000-8000-000000000000")).toBeNull();
    // The list carries the failures beside the attempts.
    expect((await listShopMail(t.db, job!.shopId)).find((m) => m.id === id)).toMatchObject({ attempts: 0, failures: 0 });
  });
});

describe("the links in a message", () => {
  it("are read from the HTML's href (entities decoded) and the text, each once, web links only", () => {
    expect(
      linksInMail({
        html: `<a href="https://a.example/report?x=1&amp;y=2">r</a> <a href='http://b.example/'>b</a> <a href="javascript:alert(1)">x</a> <a href="mailto:x@y.example">m</a>`,
        text: "Open https://a.example/report?x=1&y=2 or https://c.example/path.",
      }),
    ).toEqual(["https://a.example/report?x=1&y=2", "http://b.example/", "https://c.example/path."]);
    expect(linksInMail({ html: "<p>No links</p>", text: "None here." })).toEqual([]);
  });
});

describe("kinds by name", () => {
  it("names the head report, and reads an unknown kind as words rather than a code", () => {
    expect(mailKindName("head_report")).toBe("Head report to customer");
    expect(mailKindName("customer_link.revoked")).toBe("Customer link revoked");
    expect(mailKindName("")).toBe("Message");
  });
});
