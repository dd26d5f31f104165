import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getJob } from "@/db/queries/jobs";
import { Cautions } from "@/components/sheets/cautions";
import { MeasurementForm } from "@/components/sheets/measurement-form";
import { HEAD_KINDS } from "@/lib/measure/results";
import { MeasurementGrid } from "@/components/sheets/measurement-grid";
import { MeasurementTable } from "@/components/sheets/measurement-table";
import { requireActor } from "@/lib/auth/guard";
import { effectiveSpecs, getMeasurementGrid, listMeasurements, specKeyFor, type SpecInForce } from "@/lib/heads/sheets";
import { isClosed } from "@/lib/jobs/lifecycle";

export const metadata: Metadata = { title: "Head measurements" };

export default async function MeasurementsPage({ params }: PageProps<"/jobs/[jobId]/measurements">) {
  const actor = await requireActor("jobs:read");
  const { jobId } = await params;
  if (!z.string().uuid().safeParse(jobId).success) notFound();
  const db = await getDb();
  const job = await getJob(db, actor.shopId, jobId);
  if (!job || job.heads.length === 0) notFound();
  const [rows, grid, specs] = await Promise.all([listMeasurements(db, actor.shopId, jobId), getMeasurementGrid(db, actor.shopId, jobId), effectiveSpecs(db, jobId)]);
  const head = job.heads[0]!;
  const headSpecs: Partial<Record<string, SpecInForce>> = {};
  const headSaved: Partial<Record<string, { valueSi: number; verdict: string | null }>> = {};
  for (const k of HEAD_KINDS) {
    if (k === "journal_clearance") continue;
    const s = specs.get(specKeyFor(k, null)!);
    if (s && (s.min !== null || s.max !== null)) headSpecs[k] = { min: s.min, max: s.max, source: s.source };
    const last = rows.filter((r) => r.kind === k).at(-1);
    if (last) headSaved[k] = { valueSi: last.valueSi, verdict: last.verdict };
  }
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
        <>
          <section className="flex flex-col gap-2" aria-labelledby="grid-heading">
            <h2 id="grid-heading" className="text-lg font-semibold">
              Seats
            </h2>
            <MeasurementGrid jobId={jobId} grid={grid} />
          </section>
          <section className="rounded-xl border border-stone-300 bg-white p-4" aria-labelledby="head-heading">
            <h2 id="head-heading" className="mb-2 font-semibold">
              The head
            </h2>
            <MeasurementForm jobId={jobId} specs={headSpecs} saved={headSaved} />
          </section>
        </>
      ) : (
        <p className="rounded-lg bg-stone-200 p-3">This job is signed off: measurements are read-only.</p>
      )}
      <MeasurementTable rows={rows} />
      <Cautions extra={["Compressed springs store energy: use a proper spring compressor and keep your face clear."]} />
    </div>
  );
}
