// "Send again" is for admins of the message's shop only, re-queues only failed mail, and leaves
// an audit entry. The outbox list shows a shop only its own messages.
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { auditEntries, mailOutbox, shops, users } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { retryMailAction } = await import("@/lib/actions/mail");
const { initialActionState } = await import("@/lib/actions/state");
const { enqueueMail, listShopMail } = await import("@/lib/mail/outbox");

let byEmail: Map<string, { id: string; shopId: string }>;
let otherShopUserId: string;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  const rows = await state.t.db.select().from(users);
  byEmail = new Map(rows.map((r) => [r.email, r]));
  // A second shop, to show that one shop's admin cannot see or touch another's mail.
  const [other] = await state.t.db.insert(shops).values({ name: "Other shop" }).returning({ id: shops.id });
  const [person] = await state.t.db
    .insert(users)
    .values({ shopId: other!.id, name: "Other admin", email: "admin@other.example", role: "admin", passwordHash: "x" })
    .returning({ id: users.id });
  otherShopUserId = person!.id;
});
afterAll(async () => {
  await state.t?.cleanup();
});

const signInAs = (email: string | null) => {
  state.session = email ? { user: { id: byEmail.get(email)!.id } } : null;
};
const form = (id: string) => {
  const f = new FormData();
  f.set("id", id);
  return f;
};
const statusOf = async (id: string) =>
  (await state.t!.db.select({ s: mailOutbox.status }).from(mailOutbox).where(eq(mailOutbox.id, id)))[0]!.s;
const auditCount = async () =>
  (await state.t!.db.select({ n: sql<number>`count(*)::int` }).from(auditEntries))[0]!.n;

async function failedMail(createdById: string): Promise<string> {
  const id = await enqueueMail(state.t!.db, {
    kind: "head-report",
    recipients: ["customer@example.test"],
    subject: "Head report",
    html: "<p>Ready</p>",
    text: "Ready",
    createdById,
  });
  await state.t!.db.update(mailOutbox).set({ status: "failed", attempts: 5, failures: 5, lastError: "refused" }).where(eq(mailOutbox.id, id));
  return id;
}

describe("send again", () => {
  beforeEach(() => signInAs(null));

  it("is refused to anyone signed out and to a non-admin, and changes nothing", async () => {
    const id = await failedMail(byEmail.get("admin@millrace.example")!.id);
    const before = await auditCount();
    expect((await retryMailAction(initialActionState, form(id))).ok).toBe(false);
    signInAs("ines@millrace.example");
    const res = await retryMailAction(initialActionState, form(id));
    expect(res.ok).toBe(false);
    expect(res.message).toBe("Only an admin can manage people.");
    expect(await statusOf(id)).toBe("failed");
    expect(await auditCount()).toBe(before);
  });

  it("re-queues a failed message for an admin of its shop, with an audit entry", async () => {
    const id = await failedMail(byEmail.get("admin@millrace.example")!.id);
    signInAs("admin@millrace.example");
    const before = await auditCount();
    const res = await retryMailAction(initialActionState, form(id));
    expect(res).toMatchObject({ ok: true });
    expect(await statusOf(id)).toBe("queued");
    expect(await auditCount()).toBe(before + 1);

    // Pressed twice (two tabs): the second finds nothing failed and says so.
    const again = await retryMailAction(initialActionState, form(id));
    expect(again.ok).toBe(false);
    expect(again.message).toMatch(/no longer marked failed/);
    expect(await auditCount()).toBe(before + 1);
  });

  it("does not let an admin touch or see another shop's mail", async () => {
    const theirs = await failedMail(otherShopUserId);
    signInAs("admin@millrace.example");
    const res = await retryMailAction(initialActionState, form(theirs));
    expect(res.ok).toBe(false);
    expect(await statusOf(theirs)).toBe("failed");

    const ours = await listShopMail(state.t!.db, byEmail.get("admin@millrace.example")!.shopId);
    expect(ours.map((m) => m.id)).not.toContain(theirs);
    expect(ours.length).toBeGreaterThan(0);
    // Newest first.
    const times = ours.map((m) => m.createdAt.getTime());
    expect([...times].sort((a, b) => b - a)).toEqual(times);
  });

  it("answers a malformed id with a message, not a crash", async () => {
    signInAs("admin@millrace.example");
    const res = await retryMailAction(initialActionState, form("not-a-uuid"));
    expect(res.ok).toBe(false);
  });
});
