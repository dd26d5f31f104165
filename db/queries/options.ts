// Choices for forms: customers, people who can lap, and the specifications library.
import { asc, eq, ne, and, isNull, or } from "drizzle-orm";
import type { Db } from "@/db/client";
import { customers, engineSpecs, users } from "@/db/schema";

export interface Choice {
  id: string;
  label: string;
}

export async function customerChoices(db: Db, shopId: string): Promise<Choice[]> {
  const rows = await db.select({ id: customers.id, label: customers.name }).from(customers).where(eq(customers.shopId, shopId)).orderBy(asc(customers.name));
  return rows;
}

export async function lapperChoices(db: Db, shopId: string): Promise<Choice[]> {
  return db
    .select({ id: users.id, label: users.name })
    .from(users)
    .where(and(eq(users.shopId, shopId), ne(users.role, "admin"), eq(users.active, true)))
    .orderBy(asc(users.name));
}

/**
 * Engines offered for a job: those not retired, and the job's own engine (`keepId`) even when it
 * is retired, so editing a job never drops the engine it was booked on.
 */
export async function engineSpecChoices(db: Db, shopId: string, keepId?: string | null): Promise<Choice[]> {
  const offered = keepId ? or(isNull(engineSpecs.retiredAt), eq(engineSpecs.id, keepId)) : isNull(engineSpecs.retiredAt);
  const rows = await db
    .select({ id: engineSpecs.id, label: engineSpecs.name, retiredAt: engineSpecs.retiredAt })
    .from(engineSpecs)
    .where(and(eq(engineSpecs.shopId, shopId), offered))
    .orderBy(asc(engineSpecs.name));
  return rows.map((r) => ({ id: r.id, label: r.retiredAt ? `${r.label} (retired)` : r.label }));
}
