"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { getDb } from "@/db/client";
import { requireActor } from "@/lib/auth/guard";
import { recordAudit } from "@/lib/audit";
import { NotFoundError } from "@/lib/errors";
import { mailBelongsToShop, retryMail } from "@/lib/mail/outbox";
import { actionFailure, type ActionState } from "./state";

const retrySchema = z.object({ id: z.uuid("That message could not be found.") });

/** "Send again" on the outbox page: a failed message goes back into the queue, due now. */
export async function retryMailAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("users:manage");
    const { id } = retrySchema.parse({ id: formData.get("id") });
    const db = await getDb();
    if (!(await mailBelongsToShop(db, id, actor.shopId))) throw new NotFoundError("That message is not in your shop's outbox.");
    await db.transaction(async (tx) => {
      if (!(await retryMail(tx, id))) {
        throw new NotFoundError("That message is no longer marked failed; refresh the outbox.");
      }
      await recordAudit(tx, { actorId: actor.id, action: "mail.retried", entityType: "mail", entityId: id });
    });
    revalidatePath("/admin/outbox");
    return { ok: true, message: "Queued again; it goes out with the next send.", fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}
