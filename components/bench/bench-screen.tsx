"use client";

// The bench screen: one seat, listened to stroke by stroke. The pieces live beside it — the link
// to the server (use-bench-sync.ts), the curve and its verdict (use-stage-curve.ts), the panels
// (verdict-panel, curve-panel, bench-actions, bench-notices, bench-cues) — and this file puts
// them together and owns listening: when it starts and stops, and the cue when the seat settles.
import Link from "next/link";
import { useCallback, useEffect, useRef, useState } from "react";
import dynamic from "next/dynamic";
import type { Stroke } from "@/lib/audio/analyzer";
import type { RejectedSound } from "@/lib/audio/strokes";
import { keepRecording } from "@/lib/bench/takes";
import type { SeatReport } from "@/lib/bench/service";
import type { StrokeInput } from "@/lib/validations/bench";
import { SEAT_STATE_LABELS, STAGE_LABELS } from "@/lib/labels";
import { BenchActions } from "./bench-actions";
import { BenchCautions, BenchCue, type Cue } from "./bench-cues";
import { BenchNotices } from "./bench-notices";
import { CurvePanel } from "./curve-panel";
import { LazyDoneChecks } from "./done-checks-lazy";
import { deviceId } from "./device-id";
import { keepOfflineCopy } from "./offline-copy";
import { useBenchSync } from "./use-bench-sync";
import { useListener } from "./use-listener";
import { useStageCurve, type Stage } from "./use-stage-curve";
import { VERDICT_LABELS, VerdictPanel } from "./verdict-panel";

// Photos come after the lapping, below the curve: loaded once the screen is up, not before.
// Links on this screen do not prefetch: the phone's bandwidth is for the strokes.
// "Use a recording" is not needed to listen: loaded once the screen is up, like the photos.
const UseRecording = dynamic(() => import("./use-recording").then((m) => m.UseRecording), {
  loading: () => <div className="h-20 animate-pulse rounded-xl bg-stone-200" />,
});
const SeatPhotos = dynamic(() => import("@/components/review/seat-photos").then((m) => m.SeatPhotos), {
  loading: () => <div className="h-24 animate-pulse rounded-xl bg-stone-200" />,
});

function playTone() {
  try {
    const ctx = new AudioContext();
    const osc = ctx.createOscillator();
    const gain = ctx.createGain();
    osc.frequency.value = 880;
    gain.gain.setValueAtTime(0.0001, ctx.currentTime);
    gain.gain.exponentialRampToValueAtTime(0.3, ctx.currentTime + 0.02);
    gain.gain.exponentialRampToValueAtTime(0.0001, ctx.currentTime + 0.45);
    osc.connect(gain).connect(ctx.destination);
    osc.start();
    osc.stop(ctx.currentTime + 0.5);
    osc.onended = () => void ctx.close();
  } catch {
    /* no audio output: the full-screen cue and vibration still show it */
  }
}

export function BenchScreen({ initial, initialStage }: { initial: SeatReport; initialStage?: Stage }) {
  const seatId = initial.seat.id;
  // The session this phone is listening in: a ref for the callbacks, state for the curve.
  const sessionRef = useRef<string | null>(null);
  const [listeningIn, setListeningIn] = useState<string | null>(null);
  const stopRef = useRef<(() => Promise<void>) | null>(null);
  const { report, local, addLocal, pendingCount, syncNote, refusals, clearRefusals, setAside, outbox, takes, sync } = useBenchSync(
    initial,
    () => sessionRef.current,
    () => void stopRef.current?.(),
  );

  const defaultStage: Stage = report.stages.coarse.verdict.state === "settled" ? "fine" : "coarse";
  const [stage, setStageState] = useState<Stage>(initialStage ?? defaultStage);
  // The stage lives in the address too, so a reload comes back to the same curve.
  const setStage = useCallback((s: Stage) => {
    setStageState(s);
    window.history.replaceState(null, "", `?stage=${s}`);
  }, []);
  const [record, setRecord] = useState(true);
  const [coarseChosen, setCoarseChosen] = useState(false);
  const [speechHeard, setSpeechHeard] = useState(0);
  const [cue, setCue] = useState<Cue>(null);
  const [picked, setPicked] = useState<number | null>(null);
  const cueShown = useRef<{ settled: boolean; notSettling: boolean }>({ settled: false, notSettling: false });
  const strokeCounter = useRef(0);

  const listener = useListener({
    onCalibrated: () => {},
    onStroke: (s: Stroke, detectionMs: number) => {
      const sessionId = sessionRef.current;
      if (!sessionId) return;
      // User Timing marks, read by the bench benchmark: stroke closed → point on the curve.
      performance.mark("grindfade:stroke-received", { detail: { detectionMs } });
      strokeCounter.current += 1;
      const stroke: StrokeInput = {
        clientId: crypto.randomUUID(),
        index: strokeCounter.current,
        startS: s.startS,
        endS: s.endS,
        onsetDb: s.onsetDb,
        bodyDb: s.bodyDb,
        contrastDb: s.contrastDb,
        bandSnrDb: s.bandSnrDb,
        flags: s.flags,
      };
      addLocal({ sessionId, stroke });
      void outbox()
        .add({ kind: "stroke", seatId, sessionId, stroke })
        .then(sync);
    },
    onRejected: (sound: RejectedSound) => {
      if (sound.reason === "not-noise-like") setSpeechHeard((n) => n + 1);
    },
    onRecording: async (blob, type, keptAs) => {
      const sessionId = keptAs ?? sessionRef.current;
      if (!sessionId) return;
      await keepRecording(takes(), outbox(), { sessionId, seatId, type, blob });
      void sync();
    },
  });

  const curve = useStageCurve(report, stage, local, listeningIn);
  const { verdict } = curve;

  // The offline worker keeps this page and what it loaded; listening loads the analysis worker
  // and the worklet, so it is told again then.
  const heard = listener.phase === "listening";
  useEffect(() => keepOfflineCopy(), [seatId, heard]);

  const stopListening = listener.stop;
  useEffect(() => {
    stopRef.current = stopListening;
  }, [stopListening]);
  // The settled cue: full screen, vibration, and a tone once listening has stopped (so the
  // microphone does not hear it).
  useEffect(() => {
    if (verdict.state === "settled" && !cueShown.current.settled && (listener.phase === "listening" || curve.pending > 0)) {
      cueShown.current.settled = true;
      setCue("settled");
      navigator.vibrate?.([250, 120, 250, 120, 400]);
      void stopListening().then(() => {
        playTone();
        void finishSession();
      });
    } else if (verdict.state === "not-settling" && !cueShown.current.notSettling && listener.phase === "listening") {
      cueShown.current.notSettling = true;
      setCue("not-settling");
      navigator.vibrate?.([600]);
    }
    // finishSession is stable for this purpose; adding it would re-run the cue.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [verdict.state, listener.phase, curve.pending, stopListening]);

  async function finishSession() {
    const sessionId = sessionRef.current;
    if (!sessionId) return;
    await outbox().add({ kind: "end", seatId, sessionId });
    await sync();
  }

  async function startListening(at: Stage = stage) {
    if (at !== stage) setStage(at);
    window.history.replaceState(null, "", `?stage=${at}`);
    setCue(null);
    clearRefusals();
    setSpeechHeard(0);
    setPicked(null);
    cueShown.current = { settled: report.stages[at].verdict.state === "settled", notSettling: false };
    const sessionId = crypto.randomUUID();
    sessionRef.current = sessionId;
    setListeningIn(sessionId);
    strokeCounter.current = 0;
    const ok = await listener.start({ record, take: { sessionId, seatId } });
    if (!ok) {
      sessionRef.current = null;
      setListeningIn(null);
      return;
    }
    await outbox().add({
      kind: "session",
      seatId,
      body: { sessionId, stage: at, deviceId: deviceId(), sampleRateHz: undefined },
    });
    await sync();
  }

  async function stop() {
    await listener.stop();
    await finishSession();
  }

  const listening = listener.phase === "calibrating" || listener.phase === "listening" || listener.phase === "starting";
  // Once coarse has settled, the big button listens with fine compound, unless the technician
  // chose the coarse stage again on purpose (more coarse lapping).
  const fineOffered = stage === "coarse" && verdict.state === "settled" && !coarseChosen;
  const seatDone = stage === "fine" && verdict.state === "settled";
  const waiting = curve.pending > 0 || pendingCount > 0 ? Math.max(curve.pending, pendingCount) : 0;

  return (
    <div
      className="mx-auto flex min-h-dvh max-w-3xl flex-col gap-3 p-3 pb-8 sm:p-4"
      data-testid="bench"
      data-block-us={listener.blockMicros?.toFixed(2)}
      data-sample-rate={listener.sampleRate ?? undefined}
    >
      <header className="flex items-start justify-between gap-3">
        <div>
          <Link prefetch={false} href={`/jobs/${report.job.id}`} className="inline-flex min-h-11 items-center self-start text-sm font-semibold text-brass-dark underline-offset-2 hover:underline">
            ← {report.job.number} · {report.head.label}
          </Link>
          <h1 className="mt-1 leading-none" data-testid="seat-heading">
            <span className="figure block text-6xl font-bold sm:text-7xl">{report.seat.code}</span>
            <span className="mt-1 block text-xl font-semibold">{report.seat.label}</span>
          </h1>
          {report.seat.valveTag ? (
            <p className="mt-1 text-sm text-stone-600">
              Valve <span className="figure font-semibold">{report.seat.valveTag}</span> — it goes back into this seat only.
            </p>
          ) : null}
        </div>
        <div className="text-right">
          <span className="block text-sm text-stone-500">Seat</span>
          <span className="block font-semibold" data-testid="seat-state">
            {SEAT_STATE_LABELS[report.seat.state]}
          </span>
        </div>
      </header>

      <div role="group" aria-label="Stage" className="grid grid-cols-2 gap-2">
        {(["coarse", "fine"] as const).map((s) => (
          <button
            key={s}
            type="button"
            disabled={listening}
            aria-pressed={stage === s}
            onClick={() => {
              setStage(s);
              setCoarseChosen(s === "coarse");
              setCue(null);
            }}
            className={`min-h-14 rounded-xl border-2 text-lg font-bold disabled:opacity-60 ${stage === s ? "border-ink bg-ink text-white" : "border-stone-400 bg-white"}`}
          >
            {STAGE_LABELS[s]}
            <span className="block text-xs font-normal">{VERDICT_LABELS[report.stages[s].verdict.state]}</span>
          </button>
        ))}
      </div>

      <VerdictPanel strokes={curve.all} verdict={verdict} />

      {!report.canWork ? (
        <p className="rounded-xl border border-stone-300 bg-stone-100 p-3 text-sm">
          This seat is read-only for you
          {report.seat.state === "approved" ? ": it is signed off." : ": the job is assigned to someone else or your role only reads."}
        </p>
      ) : (
        <BenchActions
          phase={listener.phase}
          calibrationNote={listener.calibrationNote}
          hasError={Boolean(listener.error)}
          listening={listening}
          seatDone={seatDone}
          fineOffered={fineOffered}
          stage={stage}
          record={record}
          onRecordChange={setRecord}
          nextHref={report.nextSeatId ? `/bench/${report.nextSeatId}` : `/jobs/${report.job.id}`}
          hasNextSeat={Boolean(report.nextSeatId)}
          onStart={(at) => void startListening(at)}
          onStop={() => void stop()}
          onRecalibrate={listener.recalibrate}
        />
      )}

      {report.sentBack ? (
        <div role="note" className="rounded-xl border-2 border-rose-400 bg-rose-50 p-3 text-rose-950" data-testid="sent-back-reason">
          <p className="font-bold">Sent back by {report.sentBack.by}</p>
          <p className="mt-1">{report.sentBack.comment}</p>
        </div>
      ) : null}

      <CurvePanel strokes={curve.all} verdict={verdict} picked={picked} onPick={setPicked} />

      <BenchNotices
        seatId={seatId}
        waiting={waiting}
        syncNote={syncNote}
        setAside={setAside}
        refusals={refusals}
        onSendAgain={() => void outbox().retrySetAside(seatId).then(sync)}
        outbox={outbox}
        last={curve.all[curve.all.length - 1]}
        speechHeard={speechHeard}
        processing={listener.processing}
        listenError={listener.error}
      />

      {!listening ? <LazyDoneChecks seatId={seatId} canWork={report.canWork} settled={report.stages.fine.verdict.state === "settled"} /> : null}
      {!listening && report.canWork ? (
        <UseRecording
          seatId={seatId}
          stage={stage}
          earlier={curve.all.map((x) => ({ contrastDb: x.contrastDb, flags: x.flags, startS: x.startS }))}
          disabled={listener.phase !== "idle"}
          outbox={outbox}
          sync={sync}
        />
      ) : null}
      {!listening ? <SeatPhotos seatId={seatId} canAdd={report.canWork} /> : null}

      <BenchCautions />

      <BenchCue cue={cue} seatCode={report.seat.code} stage={stage} onDismiss={() => setCue(null)} />
    </div>
  );
}
