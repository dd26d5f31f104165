// Someone who leaves: the admin deactivates them (their sessions end at once, their records keep
// their name), lets them back in, and sees when each person last signed in.
import { and, desc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEntries, jobs, users } from "@/db/schema";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const { freshPglite } = await import("../helpers/db");
const { seedDemoShop, DEMO_USERS } = await import("@/db/seed");
const { currentActor } = await import("@/lib/auth/guard");
const { authOptions } = await import("@/lib/auth/options");
const { checkCredentials } = await import("@/lib/auth/credentials");
const people = await import("@/lib/actions/users");
const { initialActionState } = await import("@/lib/actions/state");
const { listPeople } = await import("@/db/queries/users");
const { getJob } = await import("@/db/queries/jobs");
const h = await import("../sheets/helpers");

const db = () => state.t!.db;
const as = (id: string, sv = 0) => {
  state.session = { user: { id, sv } } as typeof state.session;
};
const row = async (id: string) => (await db().select().from(users).where(eq(users.id, id)))[0]!;
const lastAudit = async (action: string, entityId: string) =>
  (
    await db()
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.action, action), eq(auditEntries.entityId, entityId)))
      .orderBy(desc(auditEntries.id))
      .limit(1)
  )[0];

let admin: string;
let dov: string;
let shopId: string;

// Seeding the demo shop hashes every demo password; on a busy machine that can take a minute.
beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(db());
  admin = await h.userId(db(), "admin@millrace.example");
  dov = await h.userId(db(), "dov@millrace.example");
  shopId = (await row(admin)).shopId;
}, 180_000);
afterAll(async () => {
  await state.t?.cleanup();
});

describe("deactivating and reactivating a person", () => {
  it("deactivation ends the person's sessions at once and is audited as person.deactivated with before and after", async () => {
    as(dov, 0);
    expect(await currentActor()).toMatchObject({ id: dov });
    as(admin);
    const res = await people.setActive(initialActionState, h.form({ id: dov, active: "false" }));
    expect(res).toMatchObject({
      ok: true,
      message: expect.stringMatching(/^Dov Achterberg is deactivated/),
    });
    const after = await row(dov);
    expect(after.active).toBe(false);
    expect(after.sessionVersion).toBe(1);
    // The browser still holding a token of version 0 is refused on its next request, and so is any newer one.
    as(dov, 0);
    expect(await currentActor()).toBeNull();
    as(dov, 1);
    expect(await currentActor()).toBeNull();
    const entry = await lastAudit("person.deactivated", dov);
    expect(entry).toMatchObject({
      actorId: admin,
      before: { name: "Dov Achterberg", active: true },
      after: { name: "Dov Achterberg", active: false },
    });
    // The right password no longer signs them in.
    const password = DEMO_USERS.find((u) => u.email === "dov@millrace.example")!.password;
    expect(
      await checkCredentials(db(), "dov@millrace.example", password, {
        maxFailures: 5,
        lockMinutes: 15,
      }),
    ).toEqual({ ok: false, reason: "invalid" });
  });

  it("their jobs keep their name, marked as having left", async () => {
    const [job] = await db()
      .select({ id: jobs.id })
      .from(jobs)
      .where(eq(jobs.assignedTechnicianId, dov))
      .limit(1);
    expect(job, "the demo shop has a job assigned to Dov").toBeTruthy();
    const full = await getJob(db(), shopId, job!.id);
    expect(full!.technician).toMatchObject({ id: dov, name: "Dov Achterberg", left: true });
  });

  it("a second deactivation changes nothing and writes no audit entry", async () => {
    as(admin);
    const before = (await db().select().from(auditEntries).where(eq(auditEntries.entityId, dov)))
      .length;
    expect(
      await people.setActive(initialActionState, h.form({ id: dov, active: "false" })),
    ).toMatchObject({ ok: true, message: "Nothing to change." });
    expect(
      (await db().select().from(auditEntries).where(eq(auditEntries.entityId, dov))).length,
    ).toBe(before);
    expect((await row(dov)).sessionVersion).toBe(1);
  });

  it("reactivation lets them sign in again with a new session, audited as person.reactivated", async () => {
    as(admin);
    expect(
      await people.setActive(initialActionState, h.form({ id: dov, active: "true" })),
    ).toMatchObject({ ok: true, message: "Dov Achterberg can sign in again." });
    const after = await row(dov);
    expect(after.active).toBe(true);
    expect(after.sessionVersion).toBe(2);
    // A token from before the deactivation stays dead; one made after signing in again works.
    as(dov, 0);
    expect(await currentActor()).toBeNull();
    as(dov, 2);
    expect(await currentActor()).toMatchObject({ id: dov });
    expect(await lastAudit("person.reactivated", dov)).toMatchObject({
      before: { active: false },
      after: { active: true },
    });
    const full = await getJob(
      db(),
      shopId,
      (await db().select().from(jobs).where(eq(jobs.assignedTechnicianId, dov)))[0]!.id,
    );
    expect(full!.technician?.left).toBe(false);
  });

  it("an admin cannot deactivate themselves, and the shop is never left without an active admin", async () => {
    as(admin);
    expect(
      await people.setActive(initialActionState, h.form({ id: admin, active: "false" })),
    ).toMatchObject({
      ok: false,
      message: "You cannot deactivate yourself; ask another admin.",
    });
    expect((await row(admin)).active).toBe(true);
    // A second admin deactivates the first; now alone, they cannot deactivate themselves either,
    // and the deactivated admin can no longer act at all.
    const [second] = await db()
      .insert(users)
      .values({
        shopId,
        email: "second-admin@millrace.example",
        name: "Tamsin Reed",
        role: "admin",
        passwordHash: "x",
      })
      .returning();
    as(second!.id);
    expect(
      (await people.setActive(initialActionState, h.form({ id: admin, active: "false" }))).ok,
    ).toBe(true);
    expect(
      await people.setActive(initialActionState, h.form({ id: second!.id, active: "false" })),
    ).toMatchObject({ ok: false });
    as(admin, 1);
    expect(
      await people.setActive(initialActionState, h.form({ id: second!.id, active: "false" })),
    ).toMatchObject({ ok: false, message: "Sign in to continue." });
    const activeAdmins = await db()
      .select()
      .from(users)
      .where(and(eq(users.shopId, shopId), eq(users.role, "admin"), eq(users.active, true)));
    expect(activeAdmins.map((u) => u.email)).toEqual(["second-admin@millrace.example"]);
    as(second!.id);
    expect(
      (await people.setActive(initialActionState, h.form({ id: admin, active: "true" }))).ok,
    ).toBe(true);
  });

  it("a technician cannot deactivate anyone", async () => {
    as(await h.userId(db(), "ines@millrace.example"));
    expect(
      await people.setActive(initialActionState, h.form({ id: dov, active: "false" })),
    ).toMatchObject({ ok: false, message: "Only an admin can manage people." });
    expect((await row(dov)).active).toBe(true);
  });
});

describe("last sign-in", () => {
  it("is empty until a sign-in with the right password sets it; a wrong password leaves it", async () => {
    const rhea = DEMO_USERS.find((u) => u.email === "rhea@millrace.example")!;
    const id = await h.userId(db(), rhea.email);
    expect((await row(id)).lastSignInAt).toBeNull();
    const provider = authOptions.providers[0] as unknown as {
      options: { authorize(c: unknown, req: unknown): Promise<unknown> };
    };
    await expect(
      provider.options.authorize({ email: rhea.email, password: "not-her-password" }, {}),
    ).rejects.toThrow();
    expect((await row(id)).lastSignInAt).toBeNull();
    const t0 = Date.now();
    expect(
      await provider.options.authorize({ email: rhea.email, password: rhea.password }, {}),
    ).toMatchObject({ id });
    const at = (await row(id)).lastSignInAt;
    expect(at).toBeInstanceOf(Date);
    expect(at!.getTime()).toBeGreaterThanOrEqual(t0 - 1000);
    const listed = (await listPeople(db(), shopId)).find((p) => p.id === id)!;
    expect(listed.lastSignInAt).toBe(at!.toISOString());
    expect((await listPeople(db(), shopId)).find((p) => p.id === dov)!.lastSignInAt).toBeNull();
  });

  it("a sign-in at a given moment records that moment", async () => {
    const ines = DEMO_USERS.find((u) => u.email === "ines@millrace.example")!;
    const when = new Date("2026-12-05T07:45:00Z");
    expect(
      (
        await checkCredentials(
          db(),
          ines.email,
          ines.password,
          { maxFailures: 5, lockMinutes: 15 },
          when,
        )
      ).ok,
    ).toBe(true);
    expect((await row(await h.userId(db(), ines.email))).lastSignInAt).toEqual(when);
  });
});
