"use server";

import { revalidatePath } from "next/cache";
import { getDb } from "@/db/client";
import { requireActor } from "@/lib/auth/guard";
import { insertCustomer, updateCustomerRecord } from "@/lib/customers/write";
import { customerFormFields, customerSchema, customerUpdateSchema } from "@/lib/validations/customers";
import { actionFailure, type ActionState } from "./state";

/** Adds a customer from the customers screen (supervisors and admins). */
export async function createCustomer(_prev: ActionState, formData: FormData): Promise<ActionState<{ id: string }>> {
  try {
    const actor = await requireActor("jobs:manage");
    const v = customerSchema.parse(customerFormFields(formData));
    const db = await getDb();
    const id = await db.transaction((tx) => insertCustomer(tx, actor.id, actor.shopId, v));
    revalidatePath("/customers");
    return { ok: true, message: `${v.name} added.`, fieldErrors: {}, saved: { id } };
  } catch (err) {
    return actionFailure(err);
  }
}

/** Changes a customer's name or contact details (supervisors and admins). */
export async function updateCustomer(_prev: ActionState, formData: FormData): Promise<ActionState<{ id: string }>> {
  try {
    const actor = await requireActor("jobs:manage");
    const v = customerUpdateSchema.parse({ id: formData.get("id"), ...customerFormFields(formData) });
    const db = await getDb();
    const changed = await db.transaction((tx) => updateCustomerRecord(tx, actor.id, actor.shopId, v.id, v));
    revalidatePath("/customers");
    revalidatePath(`/customers/${v.id}`);
    return { ok: true, message: changed ? `${v.name} saved.` : "Nothing changed.", fieldErrors: {}, saved: { id: v.id } };
  } catch (err) {
    return actionFailure(err);
  }
}
