import type { Metadata } from "next";
import { formatDay } from "@/lib/dates";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { eq } from "drizzle-orm";
import { engineSpecs } from "@/db/schema";
import { getJob, headSummary, seatCurves } from "@/db/queries/jobs";
import { SeatMap, DEFAULT_SETTLED_THRESHOLD_DB } from "@/components/heads/seat-map";
import { ApproveSettledForm } from "@/components/review/approve-settled-form";
import { seatVerdicts } from "./report/seat-verdicts";
import type { SeatVerdict } from "@/lib/audio";
import { shortfallText } from "@/lib/bench/done-checks";
import { JobStatusActions } from "@/components/jobs/job-status-actions";
import { ValveList, type ValveRow } from "@/components/jobs/valve-list";
import { Cautions } from "@/components/sheets/cautions";
import { SpecFigureForm } from "@/components/specs/spec-forms";
import { HeadReviewPanel } from "@/components/review/head-review-panel";
import { SeatReviewPanel } from "@/components/review/seat-review-panel";
import { getReviews, getUnapprovedSeatCodes } from "@/db/queries/reviews";
import { effectiveSpecs } from "@/lib/specs/effective";
import { getJobDoneChecks } from "@/lib/bench/done-checks";
import { SPEC_KEYS } from "@/lib/specs/keys";
import { unitLabel } from "@/lib/specs/units";
import { requireActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { seatCode } from "@/lib/heads/layout";
import { JOB_STATUS_LABELS, JOB_STATUS_TONES } from "@/lib/labels";
import { auditStartedAt, unfinishedWork } from "@/lib/jobs/hand-in";
import { allowedMoves, isClosed } from "@/lib/jobs/lifecycle";
import { Fact } from "@/components/ui/fact";
import { CustomerLinkList } from "@/components/report/customer-link-list";
import { headCompleteness, PHOTO_RULE } from "@/lib/review/completeness";
import { listCustomerLinks } from "@/lib/report/customer-links";
import { getShopTimeZone } from "@/db/queries/shops";
import { formatWhen } from "@/lib/dates";

export const metadata: Metadata = { title: "Job" };

export default async function JobPage({ params }: PageProps<"/jobs/[jobId]">) {
  const actor = await requireActor("jobs:read");
  const { jobId } = await params;
  if (!z.string().uuid().safeParse(jobId).success) notFound();
  const db = await getDb();
  const job = await getJob(db, actor.shopId, jobId);
  if (!job) notFound();
  const closed = isClosed(job.status);
  const specs = [...(await effectiveSpecs(db, job.id)).values()];
  const [engine] = job.engineSpecId
    ? await db.select({ id: engineSpecs.id, name: engineSpecs.name, retiredAt: engineSpecs.retiredAt }).from(engineSpecs).where(eq(engineSpecs.id, job.engineSpecId))
    : [];
  const reviews = await getReviews(db, actor.shopId, job.id);
  const doneChecks = await getJobDoneChecks(db, actor.shopId, job.id);
  const unapproved = await getUnapprovedSeatCodes(db, actor.shopId, job.id);
  const canReview = actor.role === "supervisor";
  // The sign-off panel's list of what is incomplete, and the customer's report links.
  const record = job.status === "awaiting_audit" && canReview ? await headCompleteness(db, actor.shopId, job.id) : null;
  const timeZone = await getShopTimeZone(db, actor.shopId);
  const links = (await listCustomerLinks(db, actor.shopId, job.id)).map((l) => ({
    id: l.id,
    status: l.status,
    sent: formatWhen(l.createdAt, timeZone),
    sentBy: l.createdBy,
    expires: formatWhen(l.expiresAt, timeZone),
    revoked: l.revokedAt ? formatWhen(l.revokedAt, timeZone) : null,
    revokedBy: l.revokedBy,
    openings: l.openings,
    lastOpened: l.lastOpenedAt ? formatWhen(l.lastOpenedAt, timeZone) : null,
  }));
  const moves = allowedMoves(job.status, actor.role).map((m) => ({ to: m.to, label: m.label }));
  const unfinished = moves.some((m) => m.to === "awaiting_audit") ? await unfinishedWork(db, job.id) : null;
  // The technician (or a supervisor) may take a head back until the supervisor starts its audit.
  const mayWork = can(actor.role, "jobs:work") && (actor.role !== "technician" || !job.technician || job.technician.id === actor.id);
  const canTakeBack = job.status === "awaiting_audit" && mayWork && !(await auditStartedAt(db, job.id));
  const range = (v: { min: number | string | null; max: number | string | null; limit: number | string | null; nominal: number | string | null }) =>
    [v.nominal !== null ? `${v.nominal}` : null, v.min !== null || v.max !== null ? `${v.min ?? "…"}–${v.max ?? "…"}` : null, v.limit !== null ? `limit ${v.limit}` : null]
      .filter(Boolean)
      .join(", ");
  const curves = new Map<string, number[]>();
  for (const h of job.heads) for (const [k, v] of await seatCurves(db, h.id)) curves.set(k, v);
  // Each seat's verdicts for its sign-off card, judged as the report judges them.
  const verdicts = new Map<string, string>();
  for (const h of job.heads) {
    for (const [seatId, v] of await seatVerdicts(db, h.id)) {
      verdicts.set(seatId, `Coarse: ${verdictWords(v.coarse.verdict)} · Fine: ${verdictWords(v.fine.verdict)}`);
    }
  }

  return (
    <article className="flex flex-col gap-6">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link href="/jobs" className="inline-flex min-h-11 items-center font-semibold text-brass-dark underline-offset-2 hover:underline">
          ← Jobs board
        </Link>
      </nav>
      <header className="flex flex-col gap-2 rounded-xl border border-stone-300 bg-white p-4 sm:p-6">
        <div className="flex flex-wrap items-center gap-3">
          <h1 className="figure text-3xl font-bold">{job.number}</h1>
          <span className={`rounded-full px-3 py-1 text-sm font-semibold ${JOB_STATUS_TONES[job.status]}`} data-testid="job-status">
            {JOB_STATUS_LABELS[job.status]}
          </span>
          {can(actor.role, "jobs:manage") && !closed ? (
            <Link href={`/jobs/${job.id}/edit`} className="ml-auto inline-flex min-h-12 items-center rounded-lg border border-stone-500 px-4 font-semibold">
              Edit job
            </Link>
          ) : null}
        </div>
        {job.heads[0] ? (
          <a
            href={`#seat-map-${job.heads[0].id}`}
            className="inline-flex min-h-12 items-center justify-center self-start rounded-lg bg-ink px-4 font-semibold text-white md:hidden"
            data-testid="to-seat-map"
          >
            Seat map ↓
          </a>
        ) : null}
        <p className="text-lg font-semibold">{job.customer.name}</p>
        <p className="text-stone-700">{job.engineDescription}</p>
        <dl className="mt-2 grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
          <Fact label="Technician">{job.technician ? `${job.technician.name}${job.technician.left ? " (left)" : ""}` : "Unassigned"}</Fact>
          <Fact label="Promised" figure>{formatDay(job.promisedOn)}</Fact>
          <Fact label="Contact">{job.customer.phone ?? job.customer.email ?? "—"}</Fact>
        </dl>
        {job.notes ? <p className="mt-2 rounded-lg bg-amber-50 p-3 text-sm">{job.notes}</p> : null}
        <JobStatusActions jobId={job.id} moves={moves} unfinished={unfinished} canTakeBack={canTakeBack} />
      </header>

      {job.heads.length === 0 ? (
        <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center text-stone-600">No head has been recorded for this job yet.</p>
      ) : (
        job.heads.map((head) => {
          const valves: ValveRow[] = head.seats.flatMap((s) =>
            s.valve
              ? [
                  {
                    valveId: s.valve.id,
                    tag: s.valve.tag,
                    partNumber: s.valve.partNumber,
                    serial: s.valve.serial,
                    seatId: s.id,
                    seatCode: seatCode(s),
                    kind: s.kind,
                    lappedInCode: s.valve.lappedInSeatId ? seatCode(head.seats.find((x) => x.id === s.valve!.lappedInSeatId) ?? s) : null,
                  },
                ]
              : [],
          );
          return (
            <section key={head.id} aria-labelledby={`head-${head.id}`} className="flex flex-col gap-4">
              <div>
                <h2 id={`head-${head.id}`} className="text-xl font-bold">
                  {head.label}
                </h2>
                <p className="text-stone-600">
                  {headSummary(head)} · numbered from the timing end
                  {head.camshafts.length ? ` · ${head.camshafts.map((c) => `${c.label} (${c.journalCount} journals)`).join(", ")}` : ""}
                </p>
              </div>
              <div className="scroll-mt-4 rounded-xl border border-stone-300 bg-white p-3" id={`seat-map-${head.id}`}>
                <h3 className="mb-2 font-semibold">Seat map — tap a seat to lap it</h3>
                <SeatMap
                  label={`Seat map of the ${head.label.toLowerCase()}`}
                  arrangement={head.arrangement}
                  cylinderCount={head.cylinderCount}
                  intakeValvesPerCylinder={head.intakeValvesPerCylinder}
                  exhaustValvesPerCylinder={head.exhaustValvesPerCylinder}
                  camshaftCount={head.camshaftCount}
                  seats={head.seats.map((s) => ({
                    id: s.id,
                    cylinder: s.cylinder,
                    kind: s.kind,
                    position: s.position,
                    state: s.state,
                    contrastsDb: curves.get(s.id) ?? [],
                    valveTag: s.valve?.tag ?? null,
                    sentBack: (() => {
                      const latest = reviews.find((r) => r.seatId === s.id);
                      return s.state === "sent_back" && latest?.decision === "sent_back" ? { comment: latest.comment ?? "", by: latest.reviewerName } : null;
                    })(),
                  }))}
                />
              </div>
              <nav aria-label="Sheets" className="grid grid-cols-2 gap-2 sm:grid-cols-4">
                {[
                  { href: `/jobs/${job.id}/clearance`, label: "Journal clearance" },
                  { href: `/jobs/${job.id}/torque`, label: "Cap torque" },
                  { href: `/jobs/${job.id}/measurements`, label: "Measurements" },
                  { href: `/api/heads/${head.id}/sheets`, label: "Export CSV" },
                ].map((l) => (
                  <a key={l.href} href={l.href} className="flex min-h-14 items-center justify-center rounded-xl border-2 border-ink bg-white px-3 text-center font-semibold">
                    {l.label}
                  </a>
                ))}
              </nav>
              <details className="rounded-xl border border-stone-300 bg-white p-3">
                <summary className="min-h-11 py-2.5 cursor-pointer font-semibold">Valves and their seats</summary>
                <p className="my-2 text-sm text-stone-600">
                  Each valve goes back into the seat it was lapped in (service manuals). Before lapping, valves may be swapped; every move is
                  recorded.
                </p>
                <ValveList jobId={job.id} valves={valves} seats={head.seats.map((s) => ({ id: s.id, code: seatCode(s), kind: s.kind }))} closed={closed} />
              </details>
              {/* Kept open once signed off, so the supervisor sees where the report went and its link. */}
              <details className="rounded-xl border border-stone-300 bg-white p-3" open={(job.status === "awaiting_audit" || job.status === "signed_off") && canReview}>
                <summary className="min-h-11 py-2.5 cursor-pointer font-semibold">Audit and sign-off</summary>
                <div className="mt-2 flex flex-col gap-3">
                  <div className="flex flex-wrap gap-2 text-sm">
                    <a href={`/jobs/${job.id}/report`} className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold">
                      Head report
                    </a>
                  </div>
                  <HeadReviewPanel
                    jobId={job.id}
                    jobNumber={job.number}
                    status={job.status}
                    unapprovedSeatCodes={unapproved}
                    reviews={reviews.filter((r) => r.seatId === null)}
                    canReview={canReview}
                    gaps={record?.gaps}
                    needsReason={record?.needsReason}
                    customer={record?.customer}
                    supervisorEmail={actor.email}
                    photoRule={PHOTO_RULE}
                  />
                  {canReview && !closed ? (
                    <ApproveSettledForm
                      jobId={job.id}
                      headLabel={head.label}
                      seats={head.seats
                        .filter((s) => s.state === "settled")
                        .map((s) => {
                          const c = doneChecks.get(s.id);
                          return { id: s.id, code: seatCode(s), shortfall: c && !c.complete ? shortfallText(c) : null };
                        })}
                    />
                  ) : null}
                  <CustomerLinkList jobId={job.id} links={links} canRevoke={canReview} />
                  <ul className="grid grid-cols-1 gap-2 md:grid-cols-2">
                    {head.seats.map((s) => (
                      <li key={s.id} className="rounded-lg border border-stone-200 p-2">
                        <div className="mb-1 flex items-center justify-between text-sm">
                          <span className="figure font-bold">{seatCode(s)}</span>
                          <a href={`/review/${s.id}`} className="inline-flex min-h-11 items-center px-1 font-semibold text-brass-dark underline-offset-2 hover:underline">
                            Listen back
                          </a>
                        </div>
                        <SeatReviewPanel
                          jobId={job.id}
                          seat={{ id: s.id, code: seatCode(s), state: s.state }}
                          reviews={reviews.filter((r) => r.seatId === s.id)}
                          canReview={canReview}
                          headClosed={closed}
                          doneChecks={doneChecks.get(s.id)}
                          curve={{ contrastsDb: curves.get(s.id) ?? [], thresholdDb: DEFAULT_SETTLED_THRESHOLD_DB }}
                          verdict={verdicts.get(s.id) ?? "Not lapped yet"}
                        />
                      </li>
                    ))}
                  </ul>
                </div>
              </details>
            </section>
          );
        })
      )}
      <section aria-labelledby="job-specs" className="rounded-xl border border-stone-300 bg-white p-4">
        <h2 id="job-specs" className="mb-2 text-lg font-semibold">
          Specifications for this job
        </h2>
        {engine ? (
          <p className="mb-2 text-sm" data-testid="job-engine-spec">
            Engine in the library:{" "}
            <Link href={`/specs#spec-${engine.id}`} className="inline-flex min-h-11 min-w-11 items-center font-semibold underline underline-offset-2">
              {engine.name}
            </Link>
            {engine.retiredAt ? <span className="ml-2 rounded bg-stone-200 px-1.5 text-xs">retired: kept for this job</span> : null}
          </p>
        ) : null}
        {specs.length === 0 ? (
          <p className="text-stone-600">No figures on file: choose an engine from the specifications library when editing the job, or enter figures with each reading.</p>
        ) : (
          <ul className="grid grid-cols-1 gap-1 text-sm sm:grid-cols-2" data-testid="job-specs">
            {specs.map((sp) => (
              <li key={sp.key} className="flex justify-between gap-2 border-b border-stone-100 py-1">
                <span>{SPEC_KEYS[sp.key]?.label ?? sp.key}</span>
                <span className="figure text-right">
                  {sp.enteredUnit && sp.entered && sp.enteredUnit !== sp.unit ? (
                    <>
                      {range({
                        min: sp.entered.min ?? null,
                        max: sp.entered.max ?? null,
                        limit: sp.entered.limit ?? null,
                        nominal: sp.entered.nominal ?? null,
                      })}{" "}
                      {unitLabel(sp.enteredUnit)} <span className="text-stone-500">({range(sp)} {sp.unit})</span>
                    </>
                  ) : (
                    <>
                      {range(sp)} {sp.unit}
                    </>
                  )}
                  <span className={`ml-2 rounded px-1.5 text-xs ${sp.source === "job_override" ? "bg-amber-200" : "bg-stone-100"}`}>
                    {sp.source === "job_override" ? `override: ${sp.note ?? ""}` : "library"}
                  </span>
                </span>
              </li>
            ))}
          </ul>
        )}
        {can(actor.role, "specs:manage") && !closed ? (
          <details className="mt-2">
            <summary className="min-h-11 py-2.5 cursor-pointer font-semibold">Override a figure on this job</summary>
            <SpecFigureForm target={{ kind: "job", jobId: job.id }} />
          </details>
        ) : null}
      </section>
      <Cautions />
    </article>
  );
}

function verdictWords(v: SeatVerdict): string {
  if (v.state === "no-strokes") return "not lapped";
  if (v.state === "settled") return `settled at stroke ${v.settled?.atStroke ?? "?"}`;
  if (v.state === "not-settling") return "not settling";
  return v.strokesRemaining !== null ? `fading (about ${v.strokesRemaining} to go)` : "fading";
}
