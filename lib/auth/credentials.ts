// Password check with a per-account lock: after too many wrong passwords in a row the account
// refuses sign-in for a while, which slows guessing without locking anyone out for good.
import bcrypt from "bcryptjs";
import { eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { users, type User } from "@/db/schema";

export interface LockPolicy {
  maxFailures: number;
  lockMinutes: number;
}

export type CredentialCheck =
  | { ok: true; user: User }
  | { ok: false; reason: "invalid" }
  | { ok: false; reason: "locked"; retryInMinutes: number };

// Compared against when the account does not exist, so both paths cost one bcrypt compare.
const DUMMY_HASH = "$2b$10$SiLhLrgj5FH4MeA/NMdnNeO51SPFeFYKBennLG9ZLDz7w5i54oJOq";

export async function checkCredentials(
  db: Db,
  email: string,
  password: string,
  policy: LockPolicy,
  now: Date = new Date(),
): Promise<CredentialCheck> {
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  if (!user || !user.active) {
    await bcrypt.compare(password, DUMMY_HASH);
    return { ok: false, reason: "invalid" };
  }
  if (user.lockedUntil && user.lockedUntil > now) {
    return {
      ok: false,
      reason: "locked",
      retryInMinutes: Math.max(1, Math.ceil((user.lockedUntil.getTime() - now.getTime()) / 60000)),
    };
  }
  const matches = await bcrypt.compare(password, user.passwordHash);
  if (matches) {
    // Every sign-in with the right password is the person's last sign-in, which the admin sees.
    await db
      .update(users)
      .set({ failedSignIns: 0, lockedUntil: null, lastSignInAt: now, updatedAt: now })
      .where(eq(users.id, user.id));
    return { ok: true, user: { ...user, failedSignIns: 0, lockedUntil: null, lastSignInAt: now } };
  }
  // Count in SQL so two wrong guesses at once both count.
  const [after] = await db
    .update(users)
    .set({ failedSignIns: sql`${users.failedSignIns} + 1`, updatedAt: now })
    .where(eq(users.id, user.id))
    .returning({ failedSignIns: users.failedSignIns });
  if ((after?.failedSignIns ?? 0) >= policy.maxFailures) {
    const lockedUntil = new Date(now.getTime() + policy.lockMinutes * 60000);
    await db
      .update(users)
      .set({ failedSignIns: 0, lockedUntil, updatedAt: now })
      .where(eq(users.id, user.id));
    return { ok: false, reason: "locked", retryInMinutes: policy.lockMinutes };
  }
  return { ok: false, reason: "invalid" };
}

export { lockedMessage } from "./sign-in-errors";
