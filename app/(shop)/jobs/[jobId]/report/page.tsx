import type { Metadata } from "next";
import { getShop } from "@/db/queries/shops";
import { getCustomer } from "@/db/queries/customers";
import { CustomerBlock, ShopLetterhead } from "@/components/report/document-header";
import { reportPrintCss } from "@/components/report/print-css";
import { SignatureBlock } from "@/components/report/signature-block";
import { usableTimeZone } from "@/lib/dates";
import { formatWhen } from "@/lib/dates";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getJob, headSummary } from "@/db/queries/jobs";
import { getReviews } from "@/db/queries/reviews";
import { SeatMap, DEFAULT_SETTLED_THRESHOLD_DB } from "@/components/heads/seat-map";
import { Sparkline } from "@/components/report/sparkline";
import { PrintButton } from "@/components/review/print-button";
import { Cautions } from "@/components/sheets/cautions";
import type { SeatVerdict } from "@/lib/audio";
import { requireActor } from "@/lib/auth/guard";
import { listJobPhotos } from "@/lib/storage/photos";
import { getJobDoneChecks } from "@/lib/bench/done-checks";
import { DONE_CHECK_KINDS, DONE_CHECK_LABELS } from "@/lib/bench/done-check-words";
import { NotFoundError } from "@/lib/errors";
import { seatCode } from "@/lib/heads/layout";
import { getClearanceSheet, getTorqueSheets, listMeasurements } from "@/lib/heads/sheets";
import { JOB_STATUS_LABELS, SEAT_STATE_LABELS } from "@/lib/labels";
import { CLEARANCE_VERDICT_LABELS } from "@/lib/measure/clearance";
import type { LappingStage } from "@/db/schema";
import { seatVerdicts, type StageSummary } from "./seat-verdicts";
import { Fact } from "@/components/ui/fact";

export const metadata: Metadata = { title: "Head report" };
// Reads the database on every request; never prerendered at build time.
export const dynamic = "force-dynamic";

const DECISION_TEXT = { approved: "Approved", sent_back: "Sent back", reopened: "Reopened" } as const;
const RESULT_TEXT: Record<string, string> = {
  within_spec: "Within spec",
  tight: "Tight",
  loose: "Loose",
  beyond_limit: "Beyond limit",
  below: "Below spec",
  above: "Above spec",
};

/** The shop's records carry the sheets for a job's first head; a job without a head has none. */
async function orNull<T>(p: Promise<T>): Promise<T | null> {
  try {
    return await p;
  } catch (err) {
    if (err instanceof NotFoundError) return null;
    throw err;
  }
}

function verdictLine(v: SeatVerdict | undefined): string {
  if (!v || v.state === "no-strokes") return "Not lapped";
  if (v.state === "settled") return `Settled at stroke ${v.settled?.atStroke ?? "?"}`;
  if (v.state === "not-settling") return "Not settling";
  return v.strokesRemaining !== null ? `Fading (~${v.strokesRemaining} to go)` : "Fading";
}

const mm = (v: number | null) => (v === null ? "…" : v.toFixed(3));

export default async function HeadReportPage({ params }: PageProps<"/jobs/[jobId]/report">) {
  const actor = await requireActor("jobs:read");
  const { jobId } = await params;
  if (!z.string().uuid().safeParse(jobId).success) notFound();
  const db = await getDb();
  const shop = await getShop(db, actor.shopId);
  const timeZone = usableTimeZone(shop?.timeZone);
  const job = await getJob(db, actor.shopId, jobId);
  if (!job) notFound();
  const customer = (await getCustomer(db, actor.shopId, job.customer.id)) ?? { ...job.customer, contactName: null, address: null };
  const [clearance, torque, measurements, reviews] = await Promise.all([
    orNull(getClearanceSheet(db, actor.shopId, jobId)),
    orNull(getTorqueSheets(db, actor.shopId, jobId)),
    orNull(listMeasurements(db, actor.shopId, jobId)),
    getReviews(db, actor.shopId, jobId),
  ]);
  const verdicts = new Map<string, Record<LappingStage, StageSummary>>();
  for (const h of job.heads) for (const [k, v] of await seatVerdicts(db, h.id)) verdicts.set(k, v);
  const others = (measurements ?? []).filter((m) => m.kind !== "journal_clearance");
  const photos = (await listJobPhotos(db, actor.shopId, job.id)).map((p) => ({ code: seatCode(p.seat), id: p.id, createdAt: p.createdAt }));
  const threshold = DEFAULT_SETTLED_THRESHOLD_DB;
  const doneChecks = await getJobDoneChecks(db, actor.shopId, job.id);
  // The head's latest decision (reviews come newest first): its sign-off, if that is what it was.
  const headDecision = reviews.find((r) => r.seatCode === null);
  const signedOff = headDecision?.decision === "approved" ? { by: headDecision.reviewerName, when: formatWhen(headDecision.createdAt, timeZone) } : null;
  const shopName = shop?.name ?? "Shop";

  return (
    <article className="report flex flex-col gap-6 print:gap-4 print:text-[10.5pt]" data-testid="head-report">
      <style>{reportPrintCss(`${shopName} · head report ${job.number}`)}</style>
      <div className="flex flex-wrap items-center gap-3 print:hidden">
        <Link href={`/jobs/${job.id}`} className="inline-flex min-h-11 items-center self-start text-sm font-semibold text-brass-dark underline-offset-2 hover:underline">
          ← {job.number}
        </Link>
        <div className="ml-auto">
          <PrintButton label="Print report" />
        </div>
      </div>

      <header className="keep-whole flex flex-col gap-3 rounded-xl border border-stone-300 bg-white p-4 print:rounded-none print:border-0 print:p-0">
        <ShopLetterhead shop={{ name: shopName, address: shop?.address ?? null, phone: shop?.phone ?? null }} />
        <div className="flex flex-wrap items-start justify-between gap-x-8 gap-y-3">
          <div>
            <p className="text-sm font-semibold uppercase tracking-wide text-stone-500">Head report</p>
            <h1 className="figure text-3xl font-bold">{job.number}</h1>
          </div>
          <CustomerBlock customer={customer} />
        </div>
        <dl className="grid grid-cols-1 gap-x-6 gap-y-1 text-sm sm:grid-cols-2 print:grid-cols-3">
          <Fact label="Engine">{job.engineDescription}</Fact>
          <Fact label="Status">{JOB_STATUS_LABELS[job.status]}</Fact>
          <Fact label="Technician">{job.technician?.name ?? "Unassigned"}</Fact>
          <Fact label="Promised" figure>{job.promisedOn ?? "—"}</Fact>
          <Fact label="Printed" figure>{formatWhen(new Date(), timeZone)}</Fact>
        </dl>
        {job.notes ? <p className="text-sm">{job.notes}</p> : null}
      </header>

      {job.heads.length === 0 ? (
        <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center">No head has been recorded for this job yet.</p>
      ) : (
        job.heads.map((head) => (
          <section key={head.id} aria-labelledby={`report-head-${head.id}`} className="flex flex-col gap-4">
            <div className="keep-whole">
              <h2 id={`report-head-${head.id}`} className="text-xl font-bold">
                {head.label}
              </h2>
              <p className="text-sm text-stone-600">{headSummary(head)} · numbered from the timing end</p>
              <div className="mt-2 rounded-xl border border-stone-300 bg-white p-3 print:border-0 print:p-0">
                <SeatMap
                  label={`Seat map of the ${head.label.toLowerCase()}`}
                  arrangement={head.arrangement}
                  cylinderCount={head.cylinderCount}
                  intakeValvesPerCylinder={head.intakeValvesPerCylinder}
                  exhaustValvesPerCylinder={head.exhaustValvesPerCylinder}
                  camshaftCount={head.camshaftCount}
                  settledThresholdDb={threshold}
                  hrefFor={(id) => `/review/${id}`}
                  seats={head.seats.map((s) => {
                    const v = verdicts.get(s.id);
                    return {
                      id: s.id,
                      cylinder: s.cylinder,
                      kind: s.kind,
                      position: s.position,
                      state: s.state,
                      contrastsDb: v ? (v.fine.contrastsDb.length ? v.fine.contrastsDb : v.coarse.contrastsDb) : [],
                      valveTag: s.valve?.tag ?? null,
                    };
                  })}
                />
              </div>
            </div>
            <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white print:overflow-visible print:border-0">
              <table className="report-seats w-full min-w-[40rem] text-left text-sm print:min-w-0" data-testid="report-seats">
                <caption className="p-3 text-left font-semibold print:px-0">Seats</caption>
                <thead className="bg-stone-100 print:bg-transparent">
                  <tr>
                    <th scope="col" className="px-3 py-2">Seat</th>
                    <th scope="col" className="px-3 py-2">State</th>
                    <th scope="col" className="px-3 py-2">Coarse</th>
                    <th scope="col" className="px-3 py-2">Fine</th>
                    <th scope="col" className="px-3 py-2">Fade</th>
                  </tr>
                </thead>
                <tbody>
                  {head.seats.map((s) => {
                    const v = verdicts.get(s.id);
                    const shown = v ? (v.fine.contrastsDb.length ? v.fine : v.coarse) : null;
                    return (
                      <tr key={s.id} className="border-t border-stone-200">
                        <th scope="row" className="px-3 py-2 font-semibold">
                          <Link href={`/review/${s.id}`} className="figure underline-offset-2 hover:underline">
                            {seatCode(s)}
                          </Link>
                          {s.valve?.tag ? <span className="block text-xs font-normal text-stone-500">valve {s.valve.tag}</span> : null}
                        </th>
                        <td className="px-3 py-2">{SEAT_STATE_LABELS[s.state]}</td>
                        <td className="px-3 py-2">
                          {verdictLine(v?.coarse.verdict)}
                          <span className="block text-xs text-stone-500">{v?.coarse.contrastsDb.length ?? 0} strokes</span>
                        </td>
                        <td className="px-3 py-2">
                          {verdictLine(v?.fine.verdict)}
                          <span className="block text-xs text-stone-500">{v?.fine.contrastsDb.length ?? 0} strokes</span>
                        </td>
                        <td className="px-3 py-2">
                          <Sparkline values={shown?.contrastsDb ?? []} thresholdDb={threshold} />
                        </td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
            </div>
          </section>
        ))
      )}

      <section aria-labelledby="report-clearance" className="flex flex-col gap-2">
        <h2 id="report-clearance" className="text-xl font-bold">
          Journal oil clearance
        </h2>
        {clearance?.spec ? (
          <p className="text-sm text-stone-700">
            Specification <span className="figure font-semibold">{mm(clearance.spec.min)}–{mm(clearance.spec.max)} mm</span>
            {clearance.spec.limit !== null ? <>, service limit <span className="figure">{mm(clearance.spec.limit)} mm</span></> : null} (
            {clearance.spec.source === "job_override" ? "overridden on this job" : "from the specifications library"})
          </p>
        ) : null}
        {!clearance || clearance.camshafts.length === 0 ? (
          <p className="text-stone-600">No camshaft journals on this head.</p>
        ) : (
          <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white print:overflow-visible print:border-0">
            <table className="w-full text-left text-sm" data-testid="report-clearance">
              <thead className="bg-stone-100 print:bg-transparent">
                <tr>
                  <th scope="col" className="px-3 py-2">Journal</th>
                  <th scope="col" className="px-3 py-2">Clearance</th>
                  <th scope="col" className="px-3 py-2">Method</th>
                  <th scope="col" className="px-3 py-2">Result</th>
                </tr>
              </thead>
              <tbody>
                {clearance.camshafts.flatMap((c) =>
                  c.journals.map((j) => (
                    <tr key={j.id} className="border-t border-stone-200">
                      <th scope="row" className="px-3 py-2 font-normal">
                        {c.label}, journal {j.position}
                      </th>
                      <td className="figure px-3 py-2">{j.reading && !j.reading.offScale ? `${j.reading.clearanceMm.toFixed(3)} mm` : "—"}</td>
                      <td className="px-3 py-2">{j.reading?.method ?? "—"}</td>
                      <td className="px-3 py-2">
                        {j.reading ? (j.reading.offScale ? "Off scale: not a clearance, measure again" : j.reading.verdict ? CLEARANCE_VERDICT_LABELS[j.reading.verdict] : "No spec") : "Not measured"}
                      </td>
                    </tr>
                  )),
                )}
              </tbody>
            </table>
          </div>
        )}
      </section>

      <section aria-labelledby="report-torque" className="flex flex-col gap-2">
        <h2 id="report-torque" className="text-xl font-bold">
          Cap torque
        </h2>
        {!torque || torque.camshafts.length === 0 ? (
          <p className="text-stone-600">No camshaft caps on this head.</p>
        ) : (
          <ul className="flex flex-col gap-2" data-testid="report-torque">
            {torque.camshafts.map((c) => {
              const sheet = c.sheet;
              const total = sheet ? sheet.order.length * sheet.stages.length : 0;
              return (
                <li key={c.id} className="rounded-xl border border-stone-300 bg-white p-3 text-sm print:rounded-none print:border-0 print:border-b print:px-0">
                  <p className="font-semibold">{c.label}</p>
                  {sheet ? (
                    <>
                      <p>
                        {sheet.stages.map((s) => `${s.label} ${s.nm.toFixed(0)} N·m`).join(" → ")}{" "}
                        <span className="text-stone-500">(final from {sheet.specSource.replace("_", " ")})</span>
                      </p>
                      <p className="figure">
                        Order: {sheet.order.join(", ")} <span className="font-sans text-stone-500">({sheet.orderSource.replace("_", " ")})</span>
                      </p>
                      <p className="font-semibold">
                        {sheet.next === null ? `All ${total} ticks done` : `${sheet.ticks.length} of ${total} ticks done — not finished`}
                      </p>
                    </>
                  ) : (
                    <p className="text-stone-600">No torque sheet set up.</p>
                  )}
                </li>
              );
            })}
          </ul>
        )}
      </section>

      <section aria-labelledby="report-measurements" className="flex flex-col gap-2">
        <h2 id="report-measurements" className="text-xl font-bold">
          Other measurements
        </h2>
        {others.length === 0 ? (
          <p className="text-stone-600">No other measurements recorded.</p>
        ) : (
          <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white print:overflow-visible print:border-0">
            <table className="w-full text-left text-sm" data-testid="report-measurements">
              <thead className="bg-stone-100 print:bg-transparent">
                <tr>
                  <th scope="col" className="px-3 py-2">Measurement</th>
                  <th scope="col" className="px-3 py-2">Where</th>
                  <th scope="col" className="px-3 py-2">Value</th>
                  <th scope="col" className="px-3 py-2">Specification</th>
                  <th scope="col" className="px-3 py-2">Result</th>
                </tr>
              </thead>
              <tbody>
                {others.map((m) => {
                  const unit = m.kind === "spring_load" ? "N" : "mm";
                  const f = (v: number | null) => (v === null ? "…" : m.kind === "spring_load" ? v.toFixed(0) : v.toFixed(3));
                  return (
                    <tr key={m.id} className="border-t border-stone-200">
                      <td className="px-3 py-2">{m.label}</td>
                      <td className="px-3 py-2">{m.where}</td>
                      <td className="figure px-3 py-2">
                        {f(m.valueSi)} {unit}
                      </td>
                      <td className="figure px-3 py-2">
                        {m.specMin === null && m.specMax === null ? "—" : `${f(m.specMin)}–${f(m.specMax)} ${unit}`}
                        {m.specSource ? <span className="block font-sans text-xs text-stone-500">{m.specSource.replace("_", " ")}</span> : null}
                      </td>
                      <td className="px-3 py-2">{m.verdict ? (RESULT_TEXT[m.verdict] ?? m.verdict) : "Not judged"}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
      </section>

      <section aria-labelledby="report-done-checks" className="flex flex-col gap-2">
        <h2 id="report-done-checks" className="text-xl font-bold">
          Done-checks
        </h2>
        <p className="text-sm text-stone-600">
          Besides the sound: an even, dull-grey contact ring of the specified width, a marking-compound contact test and a solvent leak test of
          each port, recorded at the bench.
        </p>
        {job.heads.map((head) => (
          <div key={head.id} className="overflow-x-auto rounded-xl border border-stone-300 bg-white print:overflow-visible print:border-0">
            <table className="w-full min-w-[40rem] text-left text-sm print:min-w-0" data-testid="report-done-checks">
              <thead className="bg-stone-100 print:bg-transparent">
                <tr>
                  <th scope="col" className="px-3 py-2">Seat</th>
                  {DONE_CHECK_KINDS.map((k) => (
                    <th key={k} scope="col" className="px-3 py-2">
                      {DONE_CHECK_LABELS[k]}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {head.seats.map((s) => {
                  const c = doneChecks.get(s.id);
                  return (
                    <tr key={s.id} className="border-t border-stone-200" data-seat={seatCode(s)}>
                      <th scope="row" className="figure px-3 py-2 font-semibold">
                        {seatCode(s)}
                      </th>
                      {DONE_CHECK_KINDS.map((k) => {
                        const r = c?.latest[k] ?? null;
                        return (
                          <td key={k} className="px-3 py-2 align-top" data-check={k}>
                            {r ? (
                              <>
                                <span className={`font-semibold ${r.result === "pass" ? "text-emerald-800" : "text-rose-800"}`}>{r.result === "pass" ? "Pass" : "Fail"}</span>
                                <span className="block text-xs text-stone-600">
                                  {r.recordedBy} · <span className="figure">{formatWhen(r.recordedAt, timeZone)}</span>
                                </span>
                                {k === "contact_ring" && c ? (
                                  <span className="block text-xs">
                                    {r.contactWidthMm !== null ? <span className="figure">width {r.contactWidthMm.toFixed(2)} mm</span> : "width not measured"}
                                    {c.width.specMin !== null || c.width.specMax !== null ? (
                                      <span className="figure"> (spec {c.width.specMin?.toFixed(2) ?? "…"}–{c.width.specMax?.toFixed(2) ?? "…"} mm)</span>
                                    ) : null}
                                  </span>
                                ) : null}
                                {k === "leak_test" && c ? <span className="block text-xs">{c.port}</span> : null}
                                {r.note ? <span className="block text-xs text-stone-700">“{r.note}”</span> : null}
                                {r.photoUrl ? <span className="block text-xs">photo attached</span> : null}
                              </>
                            ) : (
                              <span className="text-stone-500">Not recorded</span>
                            )}
                          </td>
                        );
                      })}
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        ))}
      </section>

      <section aria-labelledby="report-photos" className="flex flex-col gap-2">
        <h2 id="report-photos" className="text-xl font-bold">
          Contact ring photos
        </h2>
        {photos.length === 0 ? (
          <p className="text-stone-600">No photos were attached.</p>
        ) : (
          <ul className="grid grid-cols-3 gap-2 sm:grid-cols-6" data-testid="report-photos">
            {photos.map((p) => (
              <li key={p.id} className="text-xs">
                {/* eslint-disable-next-line @next/next/no-img-element */}
                <img src={`/api/photos/${p.id}`} alt={`Seat ${p.code} contact ring`} className="aspect-square w-full rounded object-cover" />
                <span className="figure">{p.code}</span>
              </li>
            ))}
          </ul>
        )}
      </section>

      <section aria-labelledby="report-signoffs" className="flex flex-col gap-2">
        <h2 id="report-signoffs" className="text-xl font-bold">
          Sign-offs
        </h2>
        {reviews.length === 0 ? (
          <p className="text-stone-600" data-testid="report-no-reviews">
            Not reviewed yet.
          </p>
        ) : (
          <ul className="flex flex-col gap-2" data-testid="report-reviews">
            {reviews.map((r) => (
              <li key={r.id} className="rounded-xl border border-stone-300 bg-white p-3 text-sm print:rounded-none print:border-0 print:border-b print:px-0">
                <p>
                  <span className="font-semibold">{DECISION_TEXT[r.decision]}</span> · {r.seatCode ? `seat ${r.seatCode}` : "whole head"} ·{" "}
                  {r.reviewerName} · <span className="figure">{formatWhen(r.createdAt, timeZone)}</span>
                </p>
                <p className="mt-1 text-stone-700">{r.comment}</p>
                {r.checksReason ? (
                  <p className="mt-1 text-stone-900" data-testid="report-checks-reason">
                    <span className="font-semibold">Approved without all done-checks:</span> {r.checksReason}
                  </p>
                ) : null}
                {r.incompleteReason ? (
                  <div className="mt-1 text-stone-900" data-testid="report-incomplete-reason">
                    <p className="font-semibold">Signed off with the record incomplete:</p>
                    <ul className="list-disc pl-5">
                      {(r.incompleteItems ?? []).map((item) => (
                        <li key={item}>{item}</li>
                      ))}
                    </ul>
                    <p>
                      <span className="font-semibold">Reason:</span> {r.incompleteReason}
                    </p>
                  </div>
                ) : null}
              </li>
            ))}
          </ul>
        )}
      </section>

      <div className="keep-whole">
        <Cautions extra={["Torque caps and head bolts to the maker's figures and sequence; loosen in reverse."]} />
      </div>

      <SignatureBlock signedOff={signedOff} />
    </article>
  );
}
