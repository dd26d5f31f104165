// The two cues a technician sees across the bay: settled (full screen) and not settling (a banner
// from below), each dismissed with one big tap.
export type Cue = "settled" | "not-settling" | null;

export function BenchCue({ cue, seatCode, stage, onDismiss }: { cue: Cue; seatCode: string; stage: "coarse" | "fine"; onDismiss(): void }) {
  if (cue === "settled") {
    return (
      <div role="alertdialog" aria-label="Seat settled" className="fixed inset-0 z-50 flex flex-col items-center justify-center gap-4 bg-emerald-600 p-6 text-center text-white" data-testid="settled-cue">
        <p className="figure text-7xl font-bold">{seatCode}</p>
        <p className="text-5xl font-black uppercase tracking-wide">Settled</p>
        <p className="text-xl">{stage === "coarse" ? "Coarse compound is done. Clean off, then lap with fine." : "This seat is lapped. Clean off all compound."}</p>
        <button type="button" onClick={onDismiss} className="min-h-16 min-w-48 rounded-2xl bg-white px-6 text-xl font-bold text-emerald-800">
          OK
        </button>
      </div>
    );
  }
  if (cue === "not-settling") {
    return (
      <div role="alertdialog" aria-label="Not settling" className="fixed inset-x-0 bottom-0 z-50 bg-amber-500 p-5 text-ink shadow-2xl" data-testid="not-settling-cue">
        <p className="text-3xl font-black">Not settling</p>
        <p className="mt-1 text-lg">
          The curve has gone flat above the settled zone. More lapping will not help: stop, check the contact ring with marking compound, and
          have the seat (and valve face) checked for recutting.
        </p>
        <button type="button" onClick={onDismiss} className="mt-3 min-h-14 w-full rounded-2xl bg-ink text-lg font-bold text-white">
          Understood
        </button>
      </div>
    );
  }
  return null;
}

/** The cautions for the work this screen asks for; the engine maker's instructions come first. */
export function BenchCautions() {
  return (
    <details className="rounded-xl border border-stone-300 bg-white p-3 text-sm">
      <summary className="min-h-11 cursor-pointer py-2.5 font-semibold">Cautions</summary>
      <ul className="mt-2 list-disc pl-5 text-stone-700">
        <li>Wear eye protection; lapping compound and grit can fly.</li>
        <li>Keep compound off the stem and guide; clean every trace afterwards with solvent, with ventilation and nitrile gloves, away from flames.</li>
        <li>
          Lift and turn the valve between strokes; never spin it with a drill. Some coated valves must not be lapped: check the engine maker&apos;s
          instructions.
        </li>
        <li>The sound is one check. Confirm with an even dull-grey ring on face and seat, and a leak test.</li>
      </ul>
    </details>
  );
}
