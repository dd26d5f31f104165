import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { seatInShop } from "@/db/queries/jobs";
import { requireActor } from "@/lib/auth/guard";

/**
 * The layout of a seat's page (bench screen, listen-back): a seat that is not there, or not of
 * this shop, answers 404 here, before the page's loading state starts the answer as a 200.
 */
export async function SeatPageGate({ params, children }: { params: Promise<{ seatId: string }>; children: React.ReactNode }) {
  const actor = await requireActor("jobs:read");
  const { seatId } = await params;
  if (!z.string().uuid().safeParse(seatId).success || !(await seatInShop(await getDb(), actor.shopId, seatId))) notFound();
  return children;
}
