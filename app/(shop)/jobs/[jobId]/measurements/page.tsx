import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getJob } from "@/db/queries/jobs";
import { Cautions } from "@/components/sheets/cautions";
import { MeasurementForm } from "@/components/sheets/measurement-form";
import { MeasurementTable } from "@/components/sheets/measurement-table";
import { requireActor } from "@/lib/auth/guard";
import { seatCode } from "@/lib/heads/layout";
import { listMeasurements } from "@/lib/heads/sheets";
import { isClosed } from "@/lib/jobs/lifecycle";

export const metadata: Metadata = { title: "Head measurements" };

export default async function MeasurementsPage({ params }: PageProps<"/jobs/[jobId]/measurements">) {
  const actor = await requireActor("jobs:read");
  const { jobId } = await params;
  if (!z.string().uuid().safeParse(jobId).success) notFound();
  const db = await getDb();
  const job = await getJob(db, actor.shopId, jobId);
  if (!job || job.heads.length === 0) notFound();
  const rows = await listMeasurements(db, actor.shopId, jobId);
  const head = job.heads[0]!;
  return (
    <div className="flex flex-col gap-4">
      <Link href={`/jobs/${jobId}`} className="inline-flex min-h-11 items-center self-start text-sm font-semibold text-brass-dark underline-offset-2 hover:underline">
        ← {job.number}
      </Link>
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h1 className="text-2xl font-bold tracking-tight">Head measurements</h1>
        <a href={`/api/heads/${head.id}/sheets`} className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold">
          Export all sheets (CSV)
        </a>
      </div>
      {!isClosed(job.status) ? (
        <section className="rounded-xl border border-stone-300 bg-white p-4" aria-label="Add a measurement">
          <h2 className="mb-2 font-semibold">Add a measurement</h2>
          <MeasurementForm jobId={jobId} seats={head.seats.map((s) => ({ id: s.id, code: seatCode(s) }))} />
        </section>
      ) : (
        <p className="rounded-lg bg-stone-200 p-3">This job is signed off: measurements are read-only.</p>
      )}
      <MeasurementTable rows={rows} />
      <Cautions extra={["Compressed springs store energy: use a proper spring compressor and keep your face clear."]} />
    </div>
  );
}
