import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getJob } from "@/db/queries/jobs";
import { headSummary } from "@/db/queries/jobs";
import { requireActor } from "@/lib/auth/guard";
import { bankOf, seatCode } from "@/lib/heads/layout";
import { JOB_STATUS_LABELS, JOB_STATUS_TONES, SEAT_STATE_LABELS, SEAT_STATE_TONES } from "@/lib/labels";

export const metadata: Metadata = { title: "Job" };

export default async function JobPage({ params }: PageProps<"/jobs/[jobId]">) {
  const actor = await requireActor("jobs:read");
  const { jobId } = await params;
  if (!z.string().uuid().safeParse(jobId).success) notFound();
  const job = await getJob(await getDb(), actor.shopId, jobId);
  if (!job) notFound();

  return (
    <article className="flex flex-col gap-6">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/jobs" className="font-semibold text-brass-dark underline-offset-2 hover:underline">
          ← Jobs board
        </Link>
      </nav>
      <header className="flex flex-col gap-2 rounded-xl border border-stone-300 bg-white p-4 sm:p-6">
        <div className="flex flex-wrap items-center gap-3">
          <h1 className="figure text-3xl font-bold">{job.number}</h1>
          <span className={`rounded-full px-3 py-1 text-sm font-semibold ${JOB_STATUS_TONES[job.status]}`}>
            {JOB_STATUS_LABELS[job.status]}
          </span>
        </div>
        <p className="text-lg font-semibold">{job.customer.name}</p>
        <p className="text-stone-700">{job.engineDescription}</p>
        <dl className="mt-2 grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
          <div>
            <dt className="text-stone-500">Technician</dt>
            <dd className="font-semibold">{job.technician?.name ?? "Unassigned"}</dd>
          </div>
          <div>
            <dt className="text-stone-500">Promised</dt>
            <dd className="figure font-semibold">{job.promisedOn ?? "—"}</dd>
          </div>
          <div>
            <dt className="text-stone-500">Contact</dt>
            <dd className="font-semibold">{job.customer.phone ?? job.customer.email ?? "—"}</dd>
          </div>
        </dl>
        {job.notes ? <p className="mt-2 rounded-lg bg-amber-50 p-3 text-sm">{job.notes}</p> : null}
      </header>

      {job.heads.length === 0 ? (
        <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center text-stone-600">
          No head has been recorded for this job yet.
        </p>
      ) : (
        job.heads.map((head) => {
          const cylinders = [...new Set(head.seats.map((s) => s.cylinder))];
          return (
            <section key={head.id} aria-labelledby={`head-${head.id}`} className="flex flex-col gap-3">
              <div>
                <h2 id={`head-${head.id}`} className="text-xl font-bold">
                  {head.label}
                </h2>
                <p className="text-stone-600">
                  {headSummary(head)} · numbered from the timing end
                  {head.camshafts.length
                    ? ` · ${head.camshafts.map((c) => `${c.label} (${c.journalCount} journals)`).join(", ")}`
                    : ""}
                </p>
              </div>
              <ol className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-3" data-testid="seat-list">
                {cylinders.map((cyl) => (
                  <li key={cyl} className="rounded-xl border border-stone-300 bg-white p-3">
                    <h3 className="mb-2 font-semibold">
                      Cylinder <span className="figure">{cyl}</span>
                      {bankOf(head, cyl) ? <span className="text-stone-500"> · bank {bankOf(head, cyl)}</span> : null}
                    </h3>
                    <ul className="flex flex-col gap-2">
                      {head.seats
                        .filter((s) => s.cylinder === cyl)
                        .map((s) => (
                          <li key={s.id}>
                            <Link
                              href={`/bench/${s.id}`}
                              className={`flex min-h-14 items-center justify-between gap-2 rounded-lg px-3 py-2 ring-1 ${SEAT_STATE_TONES[s.state]}`}
                            >
                            <span>
                              <span className="figure font-bold">{seatCode(s)}</span>{" "}
                              <span className="text-sm">
                                {s.kind === "intake" ? "Intake" : "Exhaust"} {s.position}
                              </span>
                            </span>
                            <span className="text-right text-sm">
                              <span className="block font-semibold">{SEAT_STATE_LABELS[s.state]}</span>
                              <span className="figure block text-xs opacity-80">
                                {s.valve ? `valve ${s.valve.tag}${s.valve.serial ? ` · ${s.valve.serial}` : ""}` : "no valve"}
                              </span>
                            </span>
                            </Link>
                          </li>
                        ))}
                    </ul>
                  </li>
                ))}
              </ol>
            </section>
          );
        })
      )}
    </article>
  );
}
