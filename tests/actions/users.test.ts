// The people actions check the role on the server, validate, write with an audit entry, and
// leave everything as it was when they refuse.
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { auditEntries, users } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { changeRole, createUser, resetPassword } = await import("@/lib/actions/users");
const { initialActionState } = await import("@/lib/actions/state");

let byEmail: Map<string, { id: string; role: string }>;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  const rows = await state.t.db.select().from(users);
  byEmail = new Map(rows.map((r) => [r.email, r]));
});
afterAll(async () => {
  await state.t?.cleanup();
});

function signInAs(email: string | null) {
  state.session = email ? { user: { id: byEmail.get(email)!.id } } : null;
}
const form = (o: Record<string, string>) => {
  const f = new FormData();
  for (const [k, v] of Object.entries(o)) f.set(k, v);
  return f;
};
const auditCount = async () =>
  (await state.t!.db.select({ n: sql<number>`count(*)::int` }).from(auditEntries))[0]!.n;

describe("people actions", () => {
  beforeEach(() => signInAs(null));

  it("refuse anonymous callers and technicians, changing nothing", async () => {
    const before = await auditCount();
    const target = byEmail.get("dov@millrace.example")!;
    const anon = await changeRole(initialActionState, form({ id: target.id, role: "admin" }));
    expect(anon).toMatchObject({ ok: false, message: "Sign in to continue." });
    signInAs("ines@millrace.example");
    const tech = await changeRole(initialActionState, form({ id: target.id, role: "admin" }));
    expect(tech).toMatchObject({ ok: false, message: "Only an admin can manage people." });
    const created = await createUser({ name: "Sneaky", email: "s@x.example", role: "admin", password: "long-enough-1" });
    expect(created.ok).toBe(false);
    const [row] = await state.t!.db.select().from(users).where(eq(users.id, target.id));
    expect(row!.role).toBe("technician");
    expect(await auditCount()).toBe(before);
  });

  it("an admin adds a person, with field messages for bad input", async () => {
    signInAs("admin@millrace.example");
    const bad = await createUser({ name: "", email: "nope", role: "boss", password: "short" });
    expect(bad.ok).toBe(false);
    expect(Object.keys(bad.fieldErrors).sort()).toEqual(["email", "name", "password", "role"]);
    const ok = await createUser({ name: "Wren Oakes", email: "Wren@Millrace.example", role: "supervisor", password: "fine-lapping-7" });
    expect(ok.ok).toBe(true);
    const [row] = await state.t!.db.select().from(users).where(eq(users.email, "wren@millrace.example"));
    expect(row!.role).toBe("supervisor");
    const dup = await createUser({ name: "Wren Again", email: "wren@millrace.example", role: "technician", password: "fine-lapping-7" });
    expect(dup).toMatchObject({ ok: false, fieldErrors: { email: ["Already in use."] } });
  });

  it("an admin changes a role and the audit trail records before and after", async () => {
    signInAs("admin@millrace.example");
    const target = byEmail.get("dov@millrace.example")!;
    const res = await changeRole(initialActionState, form({ id: target.id, role: "supervisor" }));
    expect(res.ok).toBe(true);
    const [entry] = await state.t!.db
      .select()
      .from(auditEntries)
      .where(eq(auditEntries.action, "user.role_changed"))
      .orderBy(sql`id desc`)
      .limit(1);
    expect(entry).toMatchObject({ entityId: target.id, before: { role: "technician" }, after: { role: "supervisor" } });
  });

  it("an admin cannot change their own role, and a reset clears a lock", async () => {
    signInAs("admin@millrace.example");
    const me = byEmail.get("admin@millrace.example")!;
    expect((await changeRole(initialActionState, form({ id: me.id, role: "technician" }))).ok).toBe(false);
    const target = byEmail.get("rhea@millrace.example")!;
    await state.t!.db
      .update(users)
      .set({ lockedUntil: new Date(Date.now() + 3600_000), failedSignIns: 2 })
      .where(eq(users.id, target.id));
    const short = await resetPassword(initialActionState, form({ id: target.id, password: "short" }));
    expect(short.fieldErrors.password?.[0]).toMatch(/at least 10/);
    const res = await resetPassword(initialActionState, form({ id: target.id, password: "a-new-password-9" }));
    expect(res.ok).toBe(true);
    const [row] = await state.t!.db.select().from(users).where(eq(users.id, target.id));
    expect(row!.lockedUntil).toBeNull();
    expect(row!.failedSignIns).toBe(0);
  });

  it("password rules hold for a new person and for a reset, and a refused one changes nothing", async () => {
    signInAs("admin@millrace.example");
    const common = await createUser({ name: "Noor Vance", email: "noor@millrace.example", role: "technician", password: "password123" });
    expect(common.ok).toBe(false);
    expect(common.fieldErrors.password?.[0]).toMatch(/first anyone would guess/);
    const own = await createUser({ name: "Noor Vance", email: "noor@millrace.example", role: "technician", password: "noor-laps-seats" });
    expect(own.fieldErrors.password?.[0]).toMatch(/e-mail/);
    expect(await state.t!.db.select().from(users).where(eq(users.email, "noor@millrace.example"))).toHaveLength(0);

    const target = byEmail.get("dov@millrace.example")!;
    const [before] = await state.t!.db.select({ hash: users.passwordHash }).from(users).where(eq(users.id, target.id));
    for (const password of ["achterberg-2026", "dov-at-the-bench", "1111111111"]) {
      const res = await resetPassword(initialActionState, form({ id: target.id, password }));
      expect(res.ok, password).toBe(false);
      expect(res.fieldErrors.password?.[0], password).toBeTruthy();
    }
    const [after] = await state.t!.db.select({ hash: users.passwordHash }).from(users).where(eq(users.id, target.id));
    expect(after!.hash).toBe(before!.hash);
  });
});
