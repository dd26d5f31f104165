// Writing a customer's record with its audit entry, inside the caller's transaction: used by the
// customers screen and by booking in a job for a new customer.
import { and, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { customers } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { BadRequestError, NotFoundError } from "@/lib/errors";
import type { CustomerValues } from "@/lib/validations/customers";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** What the audit trail keeps of a customer: every field a person typed. */
const auditView = (c: CustomerValues) => ({
  name: c.name,
  contactName: c.contactName,
  email: c.email,
  phone: c.phone,
  address: c.address,
});

export const DUPLICATE_NAME = "Another customer of the shop already has that name.";

export async function insertCustomer(tx: Tx, actorId: string, shopId: string, v: CustomerValues): Promise<string> {
  const [clash] = await tx
    .select({ id: customers.id })
    .from(customers)
    .where(and(eq(customers.shopId, shopId), eq(customers.name, v.name)))
    .limit(1);
  if (clash) throw new BadRequestError(DUPLICATE_NAME, { name: ["Already used: choose another name, or edit that customer."] });
  const [created] = await tx
    .insert(customers)
    .values({ shopId, ...auditView(v) })
    .returning({ id: customers.id });
  await recordAudit(tx, { actorId, action: "customer.created", entityType: "customer", entityId: created!.id, after: auditView(v) });
  return created!.id;
}

/** Updates the customer; false when nothing differed (no write, no entry). */
export async function updateCustomerRecord(tx: Tx, actorId: string, shopId: string, id: string, v: CustomerValues): Promise<boolean> {
  const [before] = await tx
    .select()
    .from(customers)
    .where(and(eq(customers.id, id), eq(customers.shopId, shopId)))
    .for("update");
  if (!before) throw new NotFoundError("That customer is not in your shop.");
  const was = auditView(before);
  const now = auditView(v);
  const changed = (Object.keys(now) as Array<keyof typeof now>).filter((k) => was[k] !== now[k]);
  if (changed.length === 0) return false;
  if (was.name !== now.name) {
    const [clash] = await tx
      .select({ id: customers.id })
      .from(customers)
      .where(and(eq(customers.shopId, shopId), eq(customers.name, now.name)))
      .limit(1);
    if (clash) throw new BadRequestError(DUPLICATE_NAME, { name: ["Already used: choose another name, or edit that customer."] });
  }
  await tx.update(customers).set({ ...now, updatedAt: new Date() }).where(eq(customers.id, id));
  await recordAudit(tx, {
    actorId,
    action: "customer.updated",
    entityType: "customer",
    entityId: id,
    before: Object.fromEntries(changed.map((k) => [k, was[k]])),
    after: Object.fromEntries(changed.map((k) => [k, now[k]])),
  });
  return true;
}
