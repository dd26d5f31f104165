"use client";

// What the screen has to say besides the curve: whether everything is saved, why something was
// not, and what the microphone heard that it could not use. Announced as it changes.
import type { Outbox } from "@/lib/bench/outbox";
import { RecordingUploads } from "./recording-uploads";
import type { SetAsideNotice } from "./use-bench-sync";
import type { CurveStroke } from "./use-stage-curve";

export function BenchNotices({
  seatId,
  waiting,
  syncNote,
  setAside,
  refusals,
  onSendAgain,
  outbox,
  last,
  speechHeard,
  processing,
  listenError,
}: {
  seatId: string;
  /** Items still on this phone, or 0. */
  waiting: number;
  syncNote: string | null;
  setAside: SetAsideNotice | null;
  refusals: string[];
  onSendAgain(): void;
  outbox(): Outbox;
  last: CurveStroke | undefined;
  speechHeard: number;
  processing: Array<{ label: string }>;
  listenError: string | null | undefined;
}) {
  const lastFlags = last?.flags ?? [];
  const busyRefusal = refusals.find((r) => /busy/i.test(r));
  return (
    <div aria-live="polite" className="flex flex-col gap-2">
      {waiting > 0 ? (
        <p className="rounded-lg bg-sky-100 px-3 py-2 text-sm font-semibold text-sky-900" data-testid="sync-state">
          Waiting to sync {waiting} item{waiting === 1 ? "" : "s"} — the server&apos;s verdict counts.
        </p>
      ) : (
        <p className="text-sm text-stone-500" data-testid="sync-state">
          All strokes saved on the server.
        </p>
      )}
      {syncNote ? <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900">{syncNote}</p> : null}
      <RecordingUploads outbox={outbox} seatId={seatId} />
      {setAside ? (
        <div role="alert" className="flex flex-wrap items-center gap-2 rounded-lg bg-rose-100 px-3 py-2 text-sm text-rose-900" data-testid="set-aside">
          <p className="font-semibold">
            {setAside.strokes > 0
              ? `${setAside.strokes} ${setAside.strokes === 1 ? "stroke" : "strokes"} could not be saved`
              : `${setAside.others} ${setAside.others === 1 ? "item" : "items"} could not be saved`}
            : {setAside.message} {setAside.strokes === 1 ? "It is" : "They are"} kept on this phone; show this to a supervisor.
          </p>
          <button type="button" className="min-h-11 rounded-lg border border-rose-400 bg-white px-3 font-semibold" onClick={onSendAgain}>
            Send again
          </button>
        </div>
      ) : null}
      {busyRefusal ? (
        <p role="alert" className="rounded-lg bg-rose-100 px-3 py-2 text-sm font-semibold text-rose-900">
          {busyRefusal}
        </p>
      ) : (
        refusals.slice(-1).map((r) => (
          <p key={r} role="alert" className="rounded-lg bg-rose-100 px-3 py-2 text-sm font-semibold text-rose-900">
            Not saved: {r}
          </p>
        ))
      )}
      {processing.length ? (
        <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900" data-testid="processing-warning">
          This browser kept {processing.map((p) => p.label).join(", ")} on. It can fade a steady sound and make the curve unreliable;
          some phones force it. Try another browser, or a wired microphone.
        </p>
      ) : null}
      {lastFlags.includes("too-quiet") ? (
        <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900">Too quiet to judge: move the phone closer to the head (about a hand&apos;s width).</p>
      ) : null}
      {lastFlags.includes("clipping") ? (
        <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900">
          Clipping: the sound is too loud for the microphone. Move the phone a little further away.
        </p>
      ) : null}
      {lastFlags.includes("speech") ? (
        <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900" data-testid="last-left-out">
          Stroke {last?.n} left out: talk over the stroke. Keep talk to the pauses between strokes.
        </p>
      ) : lastFlags.includes("impulsive") ? (
        <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900" data-testid="last-left-out">
          Stroke {last?.n} left out: a knock or rattle over it. Lap again when the bay is quieter, or move the phone closer.
        </p>
      ) : lastFlags.includes("start-not-heard") ? (
        <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900" data-testid="last-left-out">
          Stroke {last?.n} left out: it began before listening did. Start each stroke after &quot;Stay quiet&quot; ends.
        </p>
      ) : null}
      {speechHeard > 0 ? (
        <p className="rounded-lg bg-stone-200 px-3 py-2 text-sm text-stone-800">
          Speech or a ringing sound was heard and ignored ({speechHeard}×). Keep talk to the pauses.
        </p>
      ) : null}
      {listenError ? (
        <div role="alert" className="rounded-xl border border-rose-300 bg-rose-50 p-3 text-rose-900" data-testid="listen-error">
          <p className="font-semibold">{listenError}</p>
        </div>
      ) : null}
    </div>
  );
}
