"use server";

import { eq } from "drizzle-orm";
import { revalidatePath } from "next/cache";
import { getDb } from "@/db/client";
import { shops } from "@/db/schema";
import { requireActor } from "@/lib/auth/guard";
import { recordAudit } from "@/lib/audit";
import { BadRequestError, NotFoundError } from "@/lib/errors";
import { shopSettingsSchema } from "@/lib/validations/shop";
import { actionFailure, type ActionState } from "./state";

/** The shop's name, address, phone and time zone: the admin's to change, each change audited. */
export async function updateShopSettings(_prev: ActionState, formData: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("users:manage");
    const v = shopSettingsSchema.parse({
      name: formData.get("name"),
      address: formData.get("address"),
      phone: formData.get("phone"),
      timeZone: formData.get("timeZone"),
    });
    const db = await getDb();
    const changed = await db.transaction(async (tx) => {
      const [before] = await tx.select().from(shops).where(eq(shops.id, actor.shopId)).for("update");
      if (!before) throw new NotFoundError("Your shop could not be found.");
      const keys = (["name", "address", "phone", "timeZone"] as const).filter((k) => before[k] !== v[k]);
      if (keys.length === 0) return false;
      if (keys.includes("name")) {
        const [clash] = await tx.select({ id: shops.id }).from(shops).where(eq(shops.name, v.name)).limit(1);
        if (clash) throw new BadRequestError("Another shop already uses that name.", { name: ["Already in use: choose another name."] });
      }
      await tx.update(shops).set({ name: v.name, address: v.address, phone: v.phone, timeZone: v.timeZone, updatedAt: new Date() }).where(eq(shops.id, actor.shopId));
      await recordAudit(tx, {
        actorId: actor.id,
        action: "shop.updated",
        entityType: "shop",
        entityId: actor.shopId,
        before: Object.fromEntries(keys.map((k) => [k, before[k]])),
        after: Object.fromEntries(keys.map((k) => [k, v[k]])),
      });
      return true;
    });
    // The name shows in every page's header and the address on every report.
    revalidatePath("/", "layout");
    return { ok: true, message: changed ? "Shop details saved." : "Nothing changed.", fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}
