// The shop's customers with how to reach them, scoped to the caller's shop.
import { and, asc, count, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { customers, jobs, type Customer } from "@/db/schema";

export interface CustomerRow extends Customer {
  jobCount: number;
}

export async function listCustomers(db: Db, shopId: string): Promise<CustomerRow[]> {
  const rows = await db
    .select({ customer: customers, jobCount: count(jobs.id) })
    .from(customers)
    .leftJoin(jobs, eq(jobs.customerId, customers.id))
    .where(eq(customers.shopId, shopId))
    .groupBy(customers.id)
    .orderBy(asc(customers.name));
  return rows.map((r) => ({ ...r.customer, jobCount: Number(r.jobCount) }));
}

export async function getCustomer(db: Db, shopId: string, id: string): Promise<CustomerRow | null> {
  const [row] = await db
    .select({ customer: customers, jobCount: count(jobs.id) })
    .from(customers)
    .leftJoin(jobs, eq(jobs.customerId, customers.id))
    .where(and(eq(customers.shopId, shopId), eq(customers.id, id)))
    .groupBy(customers.id);
  return row ? { ...row.customer, jobCount: Number(row.jobCount) } : null;
}

/** The customer's jobs, newest first, for the customer's page. */
export async function customerJobs(db: Db, shopId: string, customerId: string) {
  return db
    .select({ id: jobs.id, number: jobs.number, status: jobs.status, engineDescription: jobs.engineDescription })
    .from(jobs)
    .where(and(eq(jobs.shopId, shopId), eq(jobs.customerId, customerId)))
    .orderBy(asc(jobs.number));
}
