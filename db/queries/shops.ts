import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { shops, type Shop } from "@/db/schema";

export async function getShop(db: Db, shopId: string): Promise<Shop | null> {
  const [row] = await db.select().from(shops).where(eq(shops.id, shopId)).limit(1);
  return row ?? null;
}
