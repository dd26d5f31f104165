"use client";

// "Use a recording": a recording the phone's own recorder app made of this seat's lapping is
// decoded by the browser, analysed as listening live would have heard it (lib/bench/analyze-take.ts
// in a Worker), and, once the technician has seen what was found, saved through the outbox as a
// session of this seat and stage, the file kept as its recording.
import { useRef, useState } from "react";
import { flagText, type SeatVerdict } from "@/lib/audio/verdict";
import type { TakeAnalysis } from "@/lib/bench/analyze-take";
import type { Outbox } from "@/lib/bench/outbox";
import { checkTakeFile, checkTakeLength, UNDECODABLE } from "@/lib/bench/take-file";
import { mixDown } from "@/lib/bench/analyze-take";
import { STAGE_LABELS } from "@/lib/labels";
import { SNIFF_BYTES, type Sniffed } from "@/lib/storage/sniff";
import type { StrokeInput } from "@/lib/validations/bench";
import { deviceId } from "./device-id";
import type { FromTakeWorker, ToTakeWorker } from "./take.worker";

type Stage = "coarse" | "fine";

type Step =
  | { kind: "idle" }
  | { kind: "working"; what: string; percent?: number }
  | { kind: "found"; file: File; sniffed: Sniffed; sampleRate: number; result: TakeAnalysis }
  | { kind: "saved"; strokes: number; verdict: SeatVerdict["state"] }
  | { kind: "error"; message: string };

const VERDICT_WORDS: Record<SeatVerdict["state"], string> = {
  "no-strokes": "nothing judged yet",
  fading: "still fading",
  settled: "settled",
  "not-settling": "not settling",
};

/** A worker that has not said it is up after this long will not. */
const WORKER_START_MS = 20_000;

function analyse(
  samples: Float32Array,
  sampleRate: number,
  earlier: ToTakeWorker["earlier"],
  onProgress: (p: number) => void,
): Promise<TakeAnalysis> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(new URL("./take.worker.ts", import.meta.url), { type: "module" });
    const fail = (message: string) => {
      clearTimeout(starting);
      worker.terminate();
      reject(new Error(message));
    };
    const starting = setTimeout(
      () => fail("the analysis did not start; reload the page and try again"),
      WORKER_START_MS,
    );
    worker.onmessage = (e: MessageEvent<FromTakeWorker>) => {
      const m = e.data;
      if (m.type === "ready") {
        clearTimeout(starting);
        worker.postMessage({ samples, sampleRate, earlier } satisfies ToTakeWorker, [
          samples.buffer,
        ]);
      } else if (m.type === "progress") onProgress(m.done);
      else if (m.type === "done") {
        worker.terminate();
        resolve(m.result);
      } else fail(m.message);
    };
    worker.onerror = (e) => fail(e.message || "the analysis stopped");
  });
}

async function decode(
  file: File,
): Promise<{ samples: Float32Array; sampleRate: number; durationS: number }> {
  // Decoded at the rate this phone listens at, as the microphone's sound is.
  const ctx = new AudioContext();
  try {
    const audio = await ctx.decodeAudioData(await file.arrayBuffer());
    const channels = Array.from({ length: audio.numberOfChannels }, (_, i) =>
      audio.getChannelData(i),
    );
    const mono = mixDown(channels);
    // Copied when it is a channel of the buffer, so it can be handed to the Worker.
    return {
      samples: channels.length === 1 ? mono.slice() : mono,
      sampleRate: audio.sampleRate,
      durationS: audio.duration,
    };
  } finally {
    void ctx.close().catch(() => {});
  }
}

export function UseRecording({
  seatId,
  stage,
  earlier,
  disabled,
  outbox,
  sync,
}: {
  seatId: string;
  stage: Stage;
  /** The stage's strokes already saved, in order. */
  earlier: ToTakeWorker["earlier"];
  disabled: boolean;
  outbox: () => Outbox;
  sync: () => Promise<unknown>;
}) {
  const [step, setStep] = useState<Step>({ kind: "idle" });
  const input = useRef<HTMLInputElement>(null);
  const busy = step.kind === "working";

  async function pick(file: File) {
    setStep({ kind: "working", what: "Checking the file…" });
    const check = checkTakeFile(
      file,
      new Uint8Array(await file.slice(0, SNIFF_BYTES).arrayBuffer()),
    );
    if (!check.ok) return setStep({ kind: "error", message: check.message });
    if (typeof AudioContext === "undefined" || typeof Worker === "undefined") {
      return setStep({
        kind: "error",
        message:
          "This browser cannot decode recordings. Use a current Chrome, Safari, Firefox or Edge.",
      });
    }
    setStep({ kind: "working", what: "Decoding the recording…" });
    let decoded: Awaited<ReturnType<typeof decode>>;
    try {
      decoded = await decode(file);
    } catch {
      return setStep({ kind: "error", message: UNDECODABLE(file.name) });
    }
    const tooLong = checkTakeLength(file.name, decoded.durationS);
    if (tooLong) return setStep({ kind: "error", message: tooLong });
    setStep({ kind: "working", what: "Listening to the recording…", percent: 0 });
    try {
      const result = await analyse(decoded.samples, decoded.sampleRate, earlier, (p) =>
        setStep({
          kind: "working",
          what: "Listening to the recording…",
          percent: Math.round(p * 100),
        }),
      );
      if (!result.strokes.length) {
        return setStep({
          kind: "error",
          message: `No lapping strokes were heard in “${file.name}”. The recording needs about 2 seconds of quiet at its start, then the strokes, with the phone a hand's width from the head.`,
        });
      }
      setStep({
        kind: "found",
        file,
        sniffed: check.sniffed,
        sampleRate: decoded.sampleRate,
        result,
      });
    } catch (err) {
      setStep({
        kind: "error",
        message: `The recording could not be analysed (${err instanceof Error ? err.message : String(err)}).`,
      });
    }
  }

  async function save(found: Extract<Step, { kind: "found" }>) {
    setStep({ kind: "working", what: "Saving the strokes…" });
    const sessionId = crypto.randomUUID();
    const box = outbox();
    try {
      await box.add({
        kind: "session",
        seatId,
        body: { sessionId, stage, deviceId: deviceId(), sampleRateHz: found.sampleRate },
      });
      for (const [i, s] of found.result.strokes.entries()) {
        const stroke: StrokeInput = {
          clientId: crypto.randomUUID(),
          index: i + 1,
          startS: s.startS,
          endS: s.endS,
          onsetDb: s.onsetDb,
          bodyDb: s.bodyDb,
          contrastDb: s.contrastDb,
          bandSnrDb: s.bandSnrDb,
          flags: s.flags,
        };
        await box.add({ kind: "stroke", seatId, sessionId, stroke });
      }
      await box.add({ kind: "end", seatId, sessionId });
      // The file itself is the session's recording, under the type its bytes say.
      await box.add({
        kind: "recording",
        seatId,
        sessionId,
        type: found.sniffed.type,
        blob: found.file,
      });
    } catch {
      return setStep({
        kind: "error",
        message:
          "This phone's storage is not available, so the strokes could not be kept. Free some space and try again.",
      });
    }
    setStep({
      kind: "saved",
      strokes: found.result.strokes.length,
      verdict: found.result.verdict.state,
    });
    void sync();
  }

  return (
    <section
      className="rounded-xl border border-stone-300 bg-white p-3 text-sm"
      aria-label="Use a recording"
      data-testid="use-recording"
    >
      <div className="flex flex-wrap items-center justify-between gap-2">
        <div>
          <h2 className="font-semibold">Use a recording</h2>
          <p className="text-stone-600">
            Recorded this seat with the phone&apos;s own recorder? Pick the file (m4a, MP3, Ogg or
            WAV).
          </p>
        </div>
        <label
          className={`inline-flex min-h-12 min-w-11 cursor-pointer items-center rounded-lg border-2 border-ink px-4 font-semibold focus-within:ring-2 focus-within:ring-brass ${
            disabled || busy ? "pointer-events-none opacity-50" : ""
          }`}
        >
          Pick a recording
          <input
            ref={input}
            type="file"
            accept="audio/*,.m4a,.mp3,.ogg,.opus,.oga,.wav,.webm,.aac"
            className="sr-only"
            disabled={disabled || busy}
            data-testid="use-recording-file"
            onChange={(e) => {
              const f = e.target.files?.[0];
              e.target.value = "";
              if (f) void pick(f);
            }}
          />
        </label>
      </div>
      <div aria-live="polite" className="mt-2 empty:hidden">
        {step.kind === "working" ? (
          <p data-testid="use-recording-working">
            {step.what}
            {step.percent !== undefined ? <span className="figure"> {step.percent} %</span> : null}
          </p>
        ) : null}
        {step.kind === "error" ? (
          <p
            role="alert"
            className="rounded-lg bg-rose-100 px-3 py-2 font-semibold text-rose-900"
            data-testid="use-recording-error"
          >
            {step.message}
          </p>
        ) : null}
        {step.kind === "found" ? (
          <div className="flex flex-col gap-2" data-testid="use-recording-found">
            <p>
              <span className="font-semibold">{step.file.name}</span>:{" "}
              <span className="figure" data-testid="use-recording-strokes">
                {step.result.strokes.length}
              </span>{" "}
              stroke{step.result.strokes.length === 1 ? "" : "s"} heard in{" "}
              {Math.round(step.result.durationS)} s
              {step.result.strokes.some((s) => s.flags.length) ? (
                <>
                  {" "}
                  ({step.result.strokes.filter((s) => s.flags.length).length} left out:{" "}
                  {[...new Set(step.result.strokes.flatMap((s) => s.flags))]
                    .map(flagText)
                    .join(", ")}
                  )
                </>
              ) : null}
              . {STAGE_LABELS[stage]} would be{" "}
              <span className="font-semibold" data-testid="use-recording-verdict">
                {VERDICT_WORDS[step.result.verdict.state]}
              </span>
              .
            </p>
            {step.result.afterSettled > 0 ? (
              <p className="text-stone-600">
                The stage settled at stroke {step.result.strokes.length}; the{" "}
                {step.result.afterSettled} stroke{step.result.afterSettled === 1 ? "" : "s"} after
                it are not counted, as listening live stops there.
              </p>
            ) : null}
            {step.result.calibrationDisturbed ? (
              <p className="text-amber-900">
                The room was not quiet at the start of the recording; its quiet moments were used.
              </p>
            ) : null}
            <div className="grid grid-cols-2 gap-2">
              <button
                type="button"
                className="min-h-12 rounded-lg border-2 border-stone-400 font-semibold"
                onClick={() => setStep({ kind: "idle" })}
              >
                Cancel
              </button>
              <button
                type="button"
                className="min-h-12 rounded-lg bg-emerald-700 font-bold text-white"
                data-testid="use-recording-save"
                onClick={() => void save(step)}
              >
                Save as {STAGE_LABELS[stage].toLowerCase()}
              </button>
            </div>
          </div>
        ) : null}
        {step.kind === "saved" ? (
          <p
            className="rounded-lg bg-emerald-100 px-3 py-2 font-semibold text-emerald-900"
            data-testid="use-recording-saved"
          >
            Saved: {step.strokes} stroke{step.strokes === 1 ? "" : "s"},{" "}
            {VERDICT_WORDS[step.verdict]}. The recording goes up with them.
          </p>
        ) : null}
      </div>
    </section>
  );
}
