// The dark panel under the stage buttons: strokes heard, the last onset contrast, and where the
// fade curve stands — the figures a technician reads at arm's length.
import { leftOutSummary, type SeatVerdict } from "@/lib/audio/verdict";
import type { CurveStroke } from "./use-stage-curve";

/** Our names for where the fade curve stands, as the technician reads them. */
export const VERDICT_LABELS: Record<SeatVerdict["state"], string> = {
  "no-strokes": "No strokes yet",
  fading: "Still fading",
  settled: "Settled",
  "not-settling": "Not settling",
};

export function VerdictPanel({ strokes, verdict }: { strokes: CurveStroke[]; verdict: SeatVerdict }) {
  const last = strokes[strokes.length - 1];
  const leftOutLine = leftOutSummary(verdict);
  // With strokes heard but none judged, "no strokes yet" would contradict the counter.
  const verdictLabel = verdict.state === "no-strokes" && strokes.length > 0 ? "Nothing judged yet" : VERDICT_LABELS[verdict.state];
  return (
    <section aria-live="polite" className="grid grid-cols-3 gap-2 rounded-2xl bg-ink p-3 text-white">
      <div>
        <div className="text-sm text-stone-300">Strokes</div>
        <div className="figure text-4xl font-bold" data-testid="stroke-count">
          {strokes.length}
        </div>
      </div>
      <div className="col-span-2 text-right">
        <div className="text-sm text-stone-300">Last stroke&apos;s onset contrast</div>
        <div className="figure text-5xl font-bold" data-testid="last-contrast">
          {last ? `${last.contrastDb >= 0 ? "+" : ""}${last.contrastDb.toFixed(1)}` : "—"}
          <span className="text-2xl"> dB</span>
        </div>
      </div>
      <div className="col-span-3 flex flex-wrap items-center justify-between gap-2 border-t border-stone-700 pt-2">
        <span className="text-2xl font-bold" data-testid="verdict">
          {verdictLabel}
        </span>
        <span className="text-sm text-stone-300" data-testid="forecast">
          {verdict.state === "fading"
            ? verdict.strokesRemaining !== null
              ? `about ${verdict.strokesRemaining} more stroke${verdict.strokesRemaining === 1 ? "" : "s"}`
              : "keep lapping — no steady forecast yet"
            : verdict.state === "settled"
              ? `at stroke ${verdict.settled?.atStroke}`
              : `settled: last ${verdict.rule.consecutive} ≤ ${verdict.rule.maxContrastDb} dB and flat`}
        </span>
        {leftOutLine ? (
          <span className="w-full text-sm text-amber-200" data-testid="left-out">
            {leftOutLine}
          </span>
        ) : null}
      </div>
    </section>
  );
}
