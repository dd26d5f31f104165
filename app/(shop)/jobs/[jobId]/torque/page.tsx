import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { Cautions } from "@/components/sheets/cautions";
import { TorqueSetupForm, TorqueTickList } from "@/components/sheets/torque-sheet";
import { requireActor } from "@/lib/auth/guard";
import { NotFoundError } from "@/lib/errors";
import { getTorqueSheets } from "@/lib/heads/sheets";
import { DEFAULT_STAGE_FRACTIONS } from "@/lib/measure/torque";

export const metadata: Metadata = { title: "Cap torque" };

export default async function TorquePage({ params }: PageProps<"/jobs/[jobId]/torque">) {
  const actor = await requireActor("jobs:read");
  const { jobId } = await params;
  if (!z.string().uuid().safeParse(jobId).success) notFound();
  const data = await getTorqueSheets(await getDb(), actor.shopId, jobId).catch((err: unknown) => {
    if (err instanceof NotFoundError) notFound();
    throw err;
  });
  return (
    <div className="flex flex-col gap-4">
      <Link href={`/jobs/${jobId}`} className="inline-flex min-h-11 items-center self-start text-sm font-semibold text-brass-dark underline-offset-2 hover:underline">
        ← {data.jobNumber}
      </Link>
      <h1 className="text-2xl font-bold tracking-tight">Camshaft cap torque</h1>
      <p className="text-stone-700">
        Caps numbered from the timing end; L and R are the two sides of the shaft. Tighten every bolt at one stage before
        starting the next.
      </p>
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[2fr_1fr]">
        <div className="flex flex-col gap-4">
          {data.camshafts.length === 0 ? (
            <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center">This head has no camshaft caps.</p>
          ) : (
            data.camshafts.map((c) => (
              <section key={c.id} className="rounded-xl border border-stone-300 bg-white p-4" aria-label={c.label}>
                <h2 className="mb-2 text-lg font-semibold">{c.label}</h2>
                {c.sheet ? (
                  <TorqueTickList jobId={jobId} sheet={c.sheet} specNm={data.torqueSpec?.nominal ?? null} closed={data.closed} />
                ) : (
                  <TorqueSetupForm
                    jobId={jobId}
                    camshaftId={c.id}
                    start={{ capCount: c.journalCount, boltsPerCap: 2, finalNm: null, stageFractions: DEFAULT_STAGE_FRACTIONS, order: null }}
                    specNm={data.torqueSpec?.nominal ?? null}
                    closed={data.closed}
                  />
                )}
              </section>
            ))
          )}
        </div>
        <Cautions
          extra={[
            "Caps go back in their marked place and direction before any bolt is turned.",
            "Use a calibrated torque wrench; the engine maker's order and figure override the suggested centre-out order.",
          ]}
        />
      </div>
    </div>
  );
}
