import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { ClearanceRow } from "@/components/sheets/clearance-row";
import { Cautions } from "@/components/sheets/cautions";
import { requireActor } from "@/lib/auth/guard";
import { NotFoundError } from "@/lib/errors";
import { getClearanceSheet } from "@/lib/heads/sheets";
import { GAUGE_RULES } from "@/lib/measure/clearance";

export const metadata: Metadata = { title: "Journal clearance" };

export default async function ClearancePage({ params }: PageProps<"/jobs/[jobId]/clearance">) {
  const actor = await requireActor("jobs:read");
  const { jobId } = await params;
  if (!z.string().uuid().safeParse(jobId).success) notFound();
  const sheet = await getClearanceSheet(await getDb(), actor.shopId, jobId).catch((err: unknown) => {
    if (err instanceof NotFoundError) notFound();
    throw err;
  });
  const spec = sheet.spec;
  return (
    <div className="flex flex-col gap-4">
      <Link href={`/jobs/${jobId}`} className="inline-flex min-h-11 items-center self-start text-sm font-semibold text-brass-dark underline-offset-2 hover:underline">
        ← {sheet.jobNumber}
      </Link>
      <h1 className="text-2xl font-bold tracking-tight">Journal oil clearance</h1>
      <p className="text-stone-700">
        Specification:{" "}
        {spec && spec.min !== null && spec.max !== null ? (
          <span className="figure font-semibold">
            {spec.min.toFixed(3)}–{spec.max.toFixed(3)} mm{spec.limit !== null ? `, service limit ${spec.limit.toFixed(3)} mm` : ""}
          </span>
        ) : (
          "none on file — enter it with each reading"
        )}
        {spec ? <span className="text-sm text-stone-500"> ({spec.source === "job_override" ? "overridden on this job" : "from the specifications library"})</span> : null}
      </p>
      {sheet.closed ? <p className="rounded-lg bg-stone-200 p-3">This job is signed off: the sheet is read-only.</p> : null}
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[2fr_1fr]">
        <div className="flex flex-col gap-4">
          {sheet.camshafts.length === 0 ? (
            <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center">This head has no camshaft journals to measure.</p>
          ) : (
            sheet.camshafts.map((c) => (
              <section key={c.id} aria-label={c.label}>
                <h2 className="mb-2 text-lg font-semibold">{c.label}</h2>
                <ul className="flex flex-col gap-2">
                  {c.journals.map((j) => (
                    <ClearanceRow key={j.id} jobId={jobId} camshaftLabel={c.label} journal={j} closed={sheet.closed} spec={sheet.spec} />
                  ))}
                </ul>
              </section>
            ))
          )}
        </div>
        <div className="flex flex-col gap-4">
          <aside className="rounded-xl border border-stone-300 bg-white p-4 text-sm">
            <h2 className="mb-2 font-semibold">Using gauge strips</h2>
            <ol className="list-decimal space-y-1 pl-5">
              {GAUGE_RULES.map((rule) => (
                <li key={rule}>{rule}</li>
              ))}
            </ol>
          </aside>
          <Cautions extra={["Torque the caps to the maker's figure and sequence before reading; loosen in reverse."]} />
        </div>
      </div>
    </div>
  );
}
