"use server";

import bcrypt from "bcryptjs";
import { and, asc, eq, ne, sql } from "drizzle-orm";
import { revalidatePath } from "next/cache";
import { getDb } from "@/db/client";
import { users } from "@/db/schema";
import { requireActor } from "@/lib/auth/guard";
import { recordAudit } from "@/lib/audit";
import { BadRequestError, ConflictError, NotFoundError } from "@/lib/errors";
import { passwordProblem } from "@/lib/validations/password-rules";
import { changeRoleSchema, createUserSchema, personSchema, resetPasswordSchema, setActiveSchema } from "@/lib/validations/users";
import { actionFailure, type ActionState } from "./state";

function isUniqueViolation(err: unknown): boolean {
  const e = err as { code?: string; cause?: { code?: string } };
  return e?.code === "23505" || e?.cause?.code === "23505";
}

type Tx = Parameters<Parameters<Awaited<ReturnType<typeof getDb>>["transaction"]>[0]>[0];

/** The shop keeps at least one active admin besides `personId`. */
async function assertAnotherAdmin(tx: Tx, shopId: string, personId: string): Promise<void> {
  const [others] = await tx
    .select({ n: sql<number>`count(*)::int` })
    .from(users)
    .where(and(eq(users.shopId, shopId), eq(users.role, "admin"), ne(users.id, personId), eq(users.active, true)));
  if ((others?.n ?? 0) === 0) throw new ConflictError("The shop needs at least one active admin.");
}

export async function createUser(input: unknown): Promise<ActionState> {
  try {
    const actor = await requireActor("users:manage");
    const data = createUserSchema.parse(input);
    const passwordHash = await bcrypt.hash(data.password, 10);
    const db = await getDb();
    await db.transaction(async (tx) => {
      const [created] = await tx
        .insert(users)
        .values({ shopId: actor.shopId, name: data.name, email: data.email, role: data.role, passwordHash })
        .returning({ id: users.id });
      await recordAudit(tx, {
        actorId: actor.id,
        action: "user.created",
        entityType: "user",
        entityId: created!.id,
        after: { name: data.name, email: data.email, role: data.role },
      });
    });
    revalidatePath("/admin/people");
    return { ok: true, message: `${data.name} can now sign in as ${data.role}.`, fieldErrors: {} };
  } catch (err) {
    if (isUniqueViolation(err)) {
      return { ok: false, message: "Someone already uses that e-mail address.", fieldErrors: { email: ["Already in use."] } };
    }
    return actionFailure(err);
  }
}

export async function resetPassword(_prev: ActionState, formData: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("users:manage");
    const data = resetPasswordSchema.parse({ id: formData.get("id"), password: formData.get("password") });
    const db = await getDb();
    const [person] = await db
      .select({ email: users.email, name: users.name })
      .from(users)
      .where(and(eq(users.id, data.id), eq(users.shopId, actor.shopId)))
      .limit(1);
    if (!person) throw new NotFoundError("That person is not in your shop.");
    const problem = passwordProblem(data.password, person);
    if (problem) throw new BadRequestError(problem, { password: [problem] });
    const passwordHash = await bcrypt.hash(data.password, 10);
    await db.transaction(async (tx) => {
      const [updated] = await tx
        .update(users)
        // A reset ends every session signed in with the old password.
        .set({ passwordHash, failedSignIns: 0, lockedUntil: null, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() })
        .where(and(eq(users.id, data.id), eq(users.shopId, actor.shopId)))
        .returning({ id: users.id });
      if (!updated) throw new NotFoundError("That person is not in your shop.");
      // The password itself is never written to the audit trail.
      await recordAudit(tx, { actorId: actor.id, action: "user.password_reset", entityType: "user", entityId: data.id });
    });
    revalidatePath("/admin/people");
    return { ok: true, message: "Password reset; any lock on the account is cleared and every device signed in as them is signed out.", fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}

export async function changeRole(_prev: ActionState, formData: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("users:manage");
    const data = changeRoleSchema.parse({ id: formData.get("id"), role: formData.get("role") });
    if (data.id === actor.id) {
      throw new BadRequestError("You cannot change your own role; ask another admin.");
    }
    const db = await getDb();
    await db.transaction(async (tx) => {
      const [before] = await tx
        .select({ role: users.role })
        .from(users)
        .where(and(eq(users.id, data.id), eq(users.shopId, actor.shopId)))
        .for("update");
      if (!before) throw new NotFoundError("That person is not in your shop.");
      if (before.role === data.role) return;
      if (before.role === "admin") await assertAnotherAdmin(tx, actor.shopId, data.id);
      await tx.update(users).set({ role: data.role, updatedAt: new Date() }).where(eq(users.id, data.id));
      await recordAudit(tx, {
        actorId: actor.id,
        action: "user.role_changed",
        entityType: "user",
        entityId: data.id,
        before: { role: before.role },
        after: { role: data.role },
      });
    });
    revalidatePath("/admin/people");
    return { ok: true, message: "Role changed. It applies from their next page.", fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}

/**
 * Lets a person sign in again, or stops them: a deactivated account is refused on its next
 * request on every path (its sessions end), and cannot sign in until an admin lets it again.
 */
export async function setActive(_prev: ActionState, formData: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("users:manage");
    const data = setActiveSchema.parse({ id: formData.get("id"), active: formData.get("active") });
    if (data.id === actor.id) throw new BadRequestError("You cannot deactivate yourself; ask another admin.");
    const db = await getDb();
    const changed = await db.transaction(async (tx) => {
      if (!data.active) {
        // Take the shop's admin rows first, always in the same order, so two admins deactivating
        // each other at once run one after the other and cannot leave the shop with none.
        await tx
          .select({ id: users.id })
          .from(users)
          .where(and(eq(users.shopId, actor.shopId), eq(users.role, "admin")))
          .orderBy(asc(users.id))
          .for("update");
      }
      const [before] = await tx
        .select({ name: users.name, role: users.role, active: users.active })
        .from(users)
        .where(and(eq(users.id, data.id), eq(users.shopId, actor.shopId)))
        .for("update");
      if (!before) throw new NotFoundError("That person is not in your shop.");
      if (before.active === data.active) return null;
      if (!data.active && before.role === "admin") await assertAnotherAdmin(tx, actor.shopId, data.id);
      await tx
        .update(users)
        .set({ active: data.active, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() })
        .where(eq(users.id, data.id));
      await recordAudit(tx, {
        actorId: actor.id,
        action: data.active ? "person.reactivated" : "person.deactivated",
        entityType: "user",
        entityId: data.id,
        before: { name: before.name, active: before.active },
        after: { name: before.name, active: data.active },
      });
      return before.name;
    });
    revalidatePath("/admin/people");
    if (changed === null) return { ok: true, message: "Nothing to change.", fieldErrors: {} };
    const message = data.active
      ? `${changed} can sign in again.`
      : `${changed} is deactivated: signed out everywhere at once, and cannot sign in. Their jobs, reviews and audit entries keep their name.`;
    return { ok: true, message, fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}

/** Signs a person out on every device (a lost phone): their tokens stop working at the next request. */
export async function endSessions(_prev: ActionState, formData: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("users:manage");
    const data = personSchema.parse({ id: formData.get("id") });
    const db = await getDb();
    await db.transaction(async (tx) => {
      const [updated] = await tx
        .update(users)
        .set({ sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() })
        .where(and(eq(users.id, data.id), eq(users.shopId, actor.shopId)))
        .returning({ id: users.id });
      if (!updated) throw new NotFoundError("That person is not in your shop.");
      await recordAudit(tx, { actorId: actor.id, action: "user.sessions_ended", entityType: "user", entityId: data.id });
    });
    revalidatePath("/admin/people");
    return { ok: true, message: "Signed out on every device; they sign in again with their password.", fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}
