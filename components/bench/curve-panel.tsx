"use client";

// The fade curve with its key, the stroke picked on it, and the strokes left out of the verdict.
import { flagText, type SeatVerdict } from "@/lib/audio/verdict";
import { FadeChart } from "./fade-chart";
import type { CurveStroke } from "./use-stage-curve";

export function CurvePanel({ strokes, verdict, picked, onPick }: { strokes: CurveStroke[]; verdict: SeatVerdict; picked: number | null; onPick(n: number | null): void }) {
  const pickedStroke = picked === null ? undefined : strokes.find((s) => s.n === picked);
  const leftOut = strokes.filter((s) => s.flags.length > 0);
  return (
    <div className="rounded-2xl border border-stone-300 bg-white p-2">
      <FadeChart strokes={strokes} fit={verdict.fit} thresholdDb={verdict.rule.maxContrastDb} onPick={onPick} />
      <p className="px-2 text-xs text-stone-500">
        Green band: settled zone. Dashed: fitted fade through the judged strokes. Hollow rings: strokes left out — tap one for why.
      </p>
      {pickedStroke ? (
        <p className="mx-2 mt-1 rounded-lg bg-stone-100 px-3 py-2 text-sm" data-testid="picked-stroke" aria-live="polite">
          <span className="figure font-semibold">Stroke {pickedStroke.n}</span> ·{" "}
          <span className="figure">
            {pickedStroke.contrastDb >= 0 ? "+" : ""}
            {pickedStroke.contrastDb.toFixed(1)} dB
          </span>{" "}
          · {pickedStroke.flags.length ? `left out: ${pickedStroke.flags.map(flagText).join(", ")}` : "judged"}
        </p>
      ) : null}
      {leftOut.length ? (
        <ul className="mt-1 flex flex-wrap gap-2 px-2" aria-label="Strokes left out of the verdict">
          {leftOut.map((s) => (
            <li key={s.n}>
              <button type="button" onClick={() => onPick(s.n)} aria-pressed={picked === s.n} className="min-h-11 rounded-full border-2 border-stone-500 bg-white px-3 text-sm">
                <span className="figure font-semibold">#{s.n}</span> {flagText(s.flags[0]!)}
              </button>
            </li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
