import type { Metadata } from "next";
import { Suspense } from "react";
import { JobsBoard } from "@/components/jobs/jobs-board";
import { requireActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Jobs board" };

export default async function JobsPage() {
  const actor = await requireActor("jobs:read");
  return (
    <Suspense fallback={<div className="h-40 animate-pulse rounded-xl bg-stone-200" />}>
      <JobsBoard actorId={actor.id} canBookIn={can(actor.role, "jobs:manage")} />
    </Suspense>
  );
}
