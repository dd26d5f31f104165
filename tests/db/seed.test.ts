// The demo shop seeds once, completely, and a second run changes nothing.
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { heads, jobs, lappingSessions, seats, strokes, users, valves, shops } from "@/db/schema";
import { judgeSeat } from "@/lib/audio/verdict";
import { DEMO_USERS, seedDemoShop } from "@/db/seed";
import { checkCredentials } from "@/lib/auth/credentials";
import { freshPglite, type TestDatabase } from "../helpers/db";

let t: TestDatabase;
beforeAll(async () => {
  t = await freshPglite();
});
afterAll(async () => {
  await t?.cleanup();
});

async function counts() {
  const one = async (table: typeof shops | typeof users | typeof jobs | typeof heads | typeof seats | typeof valves) =>
    (await t.db.select({ n: sql<number>`count(*)::int` }).from(table))[0]!.n;
  return {
    shops: await one(shops),
    users: await one(users),
    jobs: await one(jobs),
    heads: await one(heads),
    seats: await one(seats),
    valves: await one(valves),
  };
}

describe("demo seed", () => {
  it("seeds an empty database once and is idempotent", async () => {
    expect(await seedDemoShop(t.db)).toBe(true);
    const first = await counts();
    expect(await seedDemoShop(t.db)).toBe(false);
    expect(await counts()).toEqual(first);
    expect(first.shops).toBe(1);
    expect(first.users).toBe(DEMO_USERS.length);
  });

  it("gives every role a demo user and every head one seat and one valve per valve position", async () => {
    const roles = new Set((await t.db.select({ role: users.role }).from(users)).map((r) => r.role));
    expect([...roles].sort()).toEqual(["admin", "supervisor", "technician"]);
    const all = await t.db.select().from(heads);
    const layouts = all.map((h) => `${h.arrangement}${h.cylinderCount}`).sort();
    expect(layouts).toContain("inline4");
    expect(layouts).toContain("v6");
    for (const h of all) {
      const expected = h.cylinderCount * (h.intakeValvesPerCylinder + h.exhaustValvesPerCylinder);
      const n = (await t.db.select({ n: sql<number>`count(*)::int` }).from(seats).where(eq(seats.headId, h.id)))[0]!.n;
      const v = (await t.db.select({ n: sql<number>`count(*)::int` }).from(valves).where(eq(valves.headId, h.id)))[0]!.n;
      expect(n).toBe(expected);
      expect(v).toBe(expected);
    }
    // The 16-valve twin-cam and the 24-valve V6 are both there.
    expect(all.map((h) => h.cylinderCount * (h.intakeValvesPerCylinder + h.exhaustValvesPerCylinder))).toEqual(
      expect.arrayContaining([16, 24]),
    );
  });

  it("stores demo passwords hashed, and they sign in", async () => {
    for (const u of DEMO_USERS) {
      const [row] = await t.db.select().from(users).where(eq(users.email, u.email));
      expect(row!.passwordHash).not.toContain(u.password);
      expect(row!.passwordHash).toMatch(/^\$2[aby]\$10\$/); // bcrypt modular crypt format, cost 10
      const r = await checkCredentials(t.db, u.email, u.password, { maxFailures: 5, lockMinutes: 15 });
      expect(r.ok).toBe(true);
    }
  });

  it("gives seats shown as settled the strokes that settle them", async () => {
    const settled = await t.db.select().from(seats).where(eq(seats.state, "settled"));
    expect(settled.length).toBeGreaterThan(0);
    for (const seat of settled) {
      const rows = await t.db
        .select({ contrastDb: strokes.contrastDb, stage: lappingSessions.stage })
        .from(strokes)
        .innerJoin(lappingSessions, eq(lappingSessions.id, strokes.sessionId))
        .where(eq(lappingSessions.seatId, seat.id))
        .orderBy(strokes.index);
      for (const stage of ["coarse", "fine"] as const) {
        const v = judgeSeat(rows.filter((r) => r.stage === stage));
        expect(v.state, `${stage} on a seeded settled seat`).toBe("settled");
      }
    }
  });
});
