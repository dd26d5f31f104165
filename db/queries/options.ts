// Choices for forms: customers, people who can lap, and the specifications library.
import { asc, eq, ne, and } from "drizzle-orm";
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

export async function engineSpecChoices(db: Db, shopId: string): Promise<Choice[]> {
  return db.select({ id: engineSpecs.id, label: engineSpecs.name }).from(engineSpecs).where(eq(engineSpecs.shopId, shopId)).orderBy(asc(engineSpecs.name));
}
