import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { shops, type Shop } from "@/db/schema";
import { usableTimeZone } from "@/lib/dates";

export async function getShop(db: Db, shopId: string): Promise<Shop | null> {
  const [row] = await db.select().from(shops).where(eq(shops.id, shopId)).limit(1);
  return row ?? null;
}

/** The shop's IANA time zone, in which every date of the shop is shown (lib/dates.ts). */
export async function getShopTimeZone(db: Db, shopId: string): Promise<string> {
  const [row] = await db.select({ timeZone: shops.timeZone }).from(shops).where(eq(shops.id, shopId)).limit(1);
  return usableTimeZone(row?.timeZone);
}
