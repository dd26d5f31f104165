// A seat's done-checks as a short list: each check's counting result, who recorded it and when,
// the contact width, the note and the photo. No hooks, so the bench, the sign-off panel and the
// report all show the same lines.
import type { SeatDoneChecks } from "@/lib/bench/done-checks";
import { DEFAULT_TIME_ZONE, formatWhen } from "@/lib/dates";
import { DONE_CHECK_KINDS as KINDS, DONE_CHECK_LABELS as CHECK_LABELS } from "@/lib/bench/done-check-words";

/** The shop's one date format (lib/dates.ts), in its time zone when the caller knows it. */
export const when = (iso: string, timeZone: string = DEFAULT_TIME_ZONE) => formatWhen(iso, timeZone);
export const mm = (v: number | null) => (v === null ? "…" : v.toFixed(2));

/** "1.25 mm (spec 1.00–1.40 mm)" or what is missing. */
export function widthLine(w: SeatDoneChecks["width"]): string {
  const spec = w.specMin !== null || w.specMax !== null ? `spec ${mm(w.specMin)}–${mm(w.specMax)} mm` : "no specification on file";
  if (w.measuredMm === null) return `Width not measured yet (${spec})`;
  const verdict = w.verdict === "below" ? " — below spec" : w.verdict === "above" ? " — above spec" : w.verdict === "within_spec" ? " — within spec" : "";
  return `Width ${mm(w.measuredMm)} mm (${spec})${verdict}`;
}

export function DoneChecksSummary({ checks, testId = "done-checks-summary" }: { checks: SeatDoneChecks; testId?: string }) {
  return (
    <ul className="flex flex-col gap-1 text-sm" data-testid={testId} aria-label={`Done-checks of seat ${checks.code}`}>
      {KINDS.map((k) => {
        const r = checks.latest[k];
        const stale = !r && checks.history.some((h) => h.kind === k && h.stale);
        return (
          <li key={k} className="flex flex-wrap items-baseline gap-x-2" data-check={k} data-result={r?.result ?? "missing"}>
            <span className="font-semibold">{CHECK_LABELS[k]}</span>
            {r ? (
              <>
                <span className={`rounded px-1.5 font-semibold ${r.result === "pass" ? "bg-emerald-100 text-emerald-900" : "bg-rose-100 text-rose-900"}`}>
                  {r.result === "pass" ? "Pass" : "Fail"}
                </span>
                <span className="text-stone-600">
                  {r.recordedBy} · <time dateTime={r.recordedAt}>{when(r.recordedAt)}</time>
                </span>
                {k === "leak_test" ? <span className="text-stone-600">· {checks.port}</span> : null}
                {k === "contact_ring" && r.contactWidthMm !== null ? <span className="figure">· {mm(r.contactWidthMm)} mm</span> : null}
                {r.photoUrl ? (
                  <a href={r.photoUrl} target="_blank" rel="noreferrer" className="inline-flex min-h-11 min-w-11 items-center justify-center px-1 font-semibold text-brass-dark underline">
                    photo
                  </a>
                ) : null}
                {r.note ? <span className="w-full whitespace-pre-wrap text-stone-700">“{r.note}”</span> : null}
              </>
            ) : (
              <span className="rounded bg-stone-200 px-1.5 text-stone-700">{stale ? "Recorded before the seat was lapped again — check again" : "Not recorded"}</span>
            )}
          </li>
        );
      })}
      <li className="text-stone-600" data-testid="done-checks-width">
        {widthLine(checks.width)}
      </li>
    </ul>
  );
}
