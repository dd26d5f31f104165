import type { Metadata } from "next";
import { getShopTimeZone } from "@/db/queries/shops";
import { formatWhen } from "@/lib/dates";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { SeatPhotos } from "@/components/review/seat-photos";
import { DoneChecksSummary } from "@/components/bench/done-checks-summary";
import { getSeatDoneChecks } from "@/lib/bench/done-checks";
import { SessionReview } from "@/components/review/session-review";
import { leftOutSummary } from "@/lib/audio/verdict";
import { requireActor } from "@/lib/auth/guard";
import { getSeatReport, type StageRecord } from "@/lib/bench/service";
import { NotFoundError } from "@/lib/errors";
import { SeatReviewPanel } from "@/components/review/seat-review-panel";
import { getReviews } from "@/db/queries/reviews";
import { nextSeatToReview } from "@/lib/review/service";
import { isClosed } from "@/lib/jobs/lifecycle";

export const metadata: Metadata = { title: "Session review" };

const STAGE_NAME = { coarse: "Coarse", fine: "Fine" } as const;

type Listed = StageRecord["sessions"][number] & { stage: StageRecord["stage"] };



export default async function ReviewPage({ params, searchParams }: PageProps<"/review/[seatId]">) {
  const actor = await requireActor("jobs:read");
  const timeZone = await getShopTimeZone(await getDb(), actor.shopId);
  const { seatId } = await params;
  const { session: wanted } = await searchParams;
  if (!z.string().uuid().safeParse(seatId).success) notFound();
  const report = await getSeatReport(await getDb(), actor, seatId).catch((err: unknown) => {
    if (err instanceof NotFoundError) notFound();
    throw err;
  });
  const doneChecks = await getSeatDoneChecks(await getDb(), actor, seatId);
  const canReview = actor.role === "supervisor";
  const seatReviews = (await getReviews(await getDb(), actor.shopId, report.job.id)).filter((r) => r.seatId === report.seat.id);
  const next = await nextSeatToReview(await getDb(), actor.shopId, report.seat.id);
  const all: Listed[] = [
    ...report.stages.coarse.sessions.map((s) => ({ ...s, stage: "coarse" as const })),
    ...report.stages.fine.sessions.map((s) => ({ ...s, stage: "fine" as const })),
  ].sort((a, b) => a.startedAt.localeCompare(b.startedAt));
  // The one asked for; otherwise the latest that can be listened to; otherwise the latest at all.
  const chosen =
    (typeof wanted === "string" ? all.find((s) => s.id === wanted) : undefined) ??
    [...all].reverse().find((s) => s.hasRecording) ??
    all[all.length - 1];
  const stage = chosen ? report.stages[chosen.stage] : null;
  const strokes = chosen && stage ? stage.strokes.filter((s) => s.sessionId === chosen.id) : [];

  return (
    <div className="flex flex-col gap-4">
      <nav aria-label="Walk the head" className="flex flex-wrap items-center justify-between gap-2">
        <Link href={`/jobs/${report.job.id}`} className="inline-flex min-h-11 items-center text-sm font-semibold text-brass-dark underline-offset-2 hover:underline">
          ← {report.job.number}
        </Link>
        <NextSeat next={next} jobId={report.job.id} />
      </nav>
      <div>
        <h1 className="text-2xl font-bold tracking-tight">
          Seat {report.seat.code} <span className="font-normal text-stone-600">· {report.seat.label}</span>
        </h1>
        <p className="text-stone-700">
          {report.head.label}
          {report.seat.valveTag ? ` · valve ${report.seat.valveTag}` : ""}
        </p>
      </div>
      {all.length === 0 ? (
        <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center">
          Nobody has lapped this seat yet, so there is nothing to review.
        </p>
      ) : (
        <>
          <nav aria-label="Sessions" className="flex flex-col gap-2">
            <h2 className="text-sm font-semibold text-stone-600">Sessions on this seat</h2>
            <ul className="flex flex-wrap gap-2">
              {all.map((s) => {
                const current = s.id === chosen?.id;
                return (
                  <li key={s.id}>
                    <Link
                      href={`/review/${seatId}?session=${s.id}`}
                      aria-current={current ? "page" : undefined}
                      className={`inline-flex min-h-12 flex-col justify-center rounded-lg border px-3 text-sm ${
                        current ? "border-ink bg-ink text-white" : "border-stone-300 bg-white hover:border-stone-500"
                      }`}
                    >
                      <span className="font-semibold">
                        {STAGE_NAME[s.stage]} · {s.technicianName}
                      </span>
                      <span className={current ? "text-stone-200" : "text-stone-500"}>
                        {formatWhen(s.startedAt, timeZone)}
                        {s.hasRecording ? "" : " · not recorded"}
                      </span>
                    </Link>
                  </li>
                );
              })}
            </ul>
          </nav>
          {chosen && stage ? (
            <>
              <p className="text-stone-700">
                {STAGE_NAME[chosen.stage]} stage verdict for the seat:{" "}
                <span className="font-semibold">{verdictText(stage)}</span>
              </p>
              <SessionReview
                key={chosen.id}
                sessionId={chosen.id}
                hasRecording={chosen.hasRecording}
                strokes={strokes.map(({ n, startS, endS, onsetDb, bodyDb, contrastDb, bandSnrDb, flags }) => ({
                  n,
                  startS,
                  endS,
                  onsetDb,
                  bodyDb,
                  contrastDb,
                  bandSnrDb,
                  flags,
                }))}
                fit={stage.verdict.fit}
                thresholdDb={stage.verdict.rule.maxContrastDb}
              />
            </>
          ) : null}
        </>
      )}
      <section aria-labelledby="review-done-checks" className="rounded-xl border border-stone-300 bg-white p-3">
        <h2 id="review-done-checks" className="mb-1 font-semibold">
          Done-checks
        </h2>
        <DoneChecksSummary checks={doneChecks} testId="review-done-checks" />
      </section>
      <div id="decision" className="flex flex-col gap-2">
        <SeatReviewPanel
          jobId={report.job.id}
          seat={{ id: report.seat.id, code: report.seat.code, state: report.seat.state }}
          reviews={seatReviews}
          canReview={canReview}
          headClosed={isClosed(report.job.status)}
          doneChecks={doneChecks}
          showDoneChecks={false}
        />
        <NextSeat next={next} jobId={report.job.id} />
      </div>
      <SeatPhotos seatId={seatId} canAdd={report.canWork} />
    </div>
  );
}

function verdictText(stage: StageRecord): string {
  const v = stage.verdict;
  const leftOut = leftOutSummary(v);
  const base = (() => {
    switch (v.state) {
      case "settled":
        return `settled at stroke ${v.settled?.atStroke ?? "?"}`;
      case "not-settling":
        return "not settling — check the compound and the seat";
      case "fading":
        return v.strokesRemaining !== null ? `fading, about ${v.strokesRemaining} strokes to go` : "fading";
      default:
        return stage.strokes.length > 0 ? "nothing judged yet" : "no strokes yet";
    }
  })();
  return leftOut ? `${base} (${leftOut})` : base;
}

/** "Next seat →": the next seat of the head awaiting a decision, or a plain word that none is left. */
function NextSeat({ next, jobId }: { next: { seatId: string; code: string } | null; jobId: string }) {
  if (!next) {
    return (
      <p className="text-sm text-stone-700" data-testid="next-seat-none">
        No other seat of this head awaits a decision.{" "}
        <Link href={`/jobs/${jobId}`} className="inline-flex min-h-11 items-center font-semibold text-brass-dark underline underline-offset-2">
          Back to the job
        </Link>
      </p>
    );
  }
  return (
    <Link
      href={`/review/${next.seatId}`}
      className="inline-flex min-h-12 items-center justify-center rounded-lg bg-ink px-4 font-semibold text-white"
      data-testid="next-seat"
    >
      Next seat <span className="figure mx-1">{next.code}</span> →
    </Link>
  );
}
