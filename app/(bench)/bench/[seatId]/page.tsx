import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { BenchScreen } from "@/components/bench/bench-screen";
import { requireActor } from "@/lib/auth/guard";
import { getSeatReport } from "@/lib/bench/service";
import { NotFoundError } from "@/lib/errors";

export const metadata: Metadata = { title: "Bench" };

export default async function BenchPage({ params, searchParams }: PageProps<"/bench/[seatId]">) {
  const actor = await requireActor("jobs:read");
  const { seatId } = await params;
  const { stage } = await searchParams;
  const initialStage = stage === "coarse" || stage === "fine" ? stage : undefined;
  if (!z.string().uuid().safeParse(seatId).success) notFound();
  const report = await getSeatReport(await getDb(), actor, seatId).catch((err: unknown) => {
    if (err instanceof NotFoundError) notFound();
    throw err;
  });
  return <BenchScreen key={seatId} initial={report} initialStage={initialStage} />;
}
