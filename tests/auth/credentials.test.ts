// Wrong passwords lock an account for a while; the right one afterwards waits out the lock.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { users } from "@/db/schema";
import { DEMO_USERS, seedDemoShop } from "@/db/seed";
import { checkCredentials, lockedMessage } from "@/lib/auth/credentials";
import { freshPglite, type TestDatabase } from "../helpers/db";

let t: TestDatabase;
const policy = { maxFailures: 3, lockMinutes: 10 };
const tech = DEMO_USERS.find((u) => u.role === "technician")!;
const sup = DEMO_USERS.find((u) => u.role === "supervisor")!;

beforeAll(async () => {
  t = await freshPglite();
  await seedDemoShop(t.db);
});
afterAll(async () => {
  await t?.cleanup();
});

describe("checkCredentials", () => {
  it("accepts the right password and refuses a wrong one or an unknown account alike", async () => {
    expect((await checkCredentials(t.db, tech.email, tech.password, policy)).ok).toBe(true);
    expect(await checkCredentials(t.db, tech.email, "nope", policy)).toEqual({ ok: false, reason: "invalid" });
    expect(await checkCredentials(t.db, "ghost@nowhere.example", "nope", policy)).toEqual({ ok: false, reason: "invalid" });
  });

  it("locks after the set number of failures, refuses even the right password, and unlocks later", async () => {
    const t0 = new Date("2026-06-01T08:00:00Z");
    expect((await checkCredentials(t.db, sup.email, "bad-1", policy, t0)).ok).toBe(false);
    expect((await checkCredentials(t.db, sup.email, "bad-2", policy, t0)).ok).toBe(false);
    expect(await checkCredentials(t.db, sup.email, "bad-3", policy, t0)).toEqual({
      ok: false,
      reason: "locked",
      retryInMinutes: 10,
    });
    const during = new Date(t0.getTime() + 4 * 60000);
    expect(await checkCredentials(t.db, sup.email, sup.password, policy, during)).toEqual({
      ok: false,
      reason: "locked",
      retryInMinutes: 6,
    });
    const after = new Date(t0.getTime() + 11 * 60000);
    expect((await checkCredentials(t.db, sup.email, sup.password, policy, after)).ok).toBe(true);
    const [row] = await t.db.select().from(users).where(eq(users.email, sup.email));
    expect(row!.failedSignIns).toBe(0);
    expect(row!.lockedUntil).toBeNull();
  });

  it("a success resets the count of failures", async () => {
    expect((await checkCredentials(t.db, tech.email, tech.password, policy)).ok).toBe(true);
    await checkCredentials(t.db, tech.email, "bad", policy);
    await checkCredentials(t.db, tech.email, "bad", policy);
    expect((await checkCredentials(t.db, tech.email, tech.password, policy)).ok).toBe(true);
    await checkCredentials(t.db, tech.email, "bad", policy);
    const r = await checkCredentials(t.db, tech.email, "bad", policy);
    expect(r).toEqual({ ok: false, reason: "invalid" });
  });

  it("a disabled account cannot sign in", async () => {
    await t.db.update(users).set({ active: false }).where(eq(users.email, tech.email));
    expect(await checkCredentials(t.db, tech.email, tech.password, policy)).toEqual({ ok: false, reason: "invalid" });
    await t.db.update(users).set({ active: true }).where(eq(users.email, tech.email));
  });

  it("words the lock message for people", () => {
    expect(lockedMessage(1)).toMatch(/locked for 1 more minute\./);
    expect(lockedMessage(5)).toMatch(/5 more minutes/);
  });
});
