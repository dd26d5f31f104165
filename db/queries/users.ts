import { asc, eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { users, type UserRole } from "@/db/schema";

export interface PersonRow {
  id: string;
  name: string;
  email: string;
  role: UserRole;
  active: boolean;
  lockedUntil: string | null;
  locked: boolean;
  /** ISO time of the last sign-in with the right password; null when they never signed in. */
  lastSignInAt: string | null;
}

export async function listPeople(db: Db, shopId: string): Promise<PersonRow[]> {
  const rows = await db
    .select({
      id: users.id,
      name: users.name,
      email: users.email,
      role: users.role,
      active: users.active,
      lockedUntil: users.lockedUntil,
      locked: sql<boolean>`coalesce(${users.lockedUntil} > now(), false)`,
      lastSignInAt: users.lastSignInAt,
    })
    .from(users)
    .where(eq(users.shopId, shopId))
    .orderBy(asc(users.name));
  return rows.map((r) => ({
    ...r,
    lockedUntil: r.lockedUntil ? r.lockedUntil.toISOString() : null,
    lastSignInAt: r.lastSignInAt ? r.lastSignInAt.toISOString() : null,
  }));
}
