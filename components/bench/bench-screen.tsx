"use client";

import Link from "next/link";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import type { Stroke } from "@/lib/audio/analyzer";
import type { RejectedSound } from "@/lib/audio/strokes";
import { flagText, judgeSeat, leftOutSummary, type SeatVerdict } from "@/lib/audio/verdict";
import { Outbox, type FlushReport, type PendingStroke } from "@/lib/bench/outbox";
import { keepRecording, recoverTakes, Takes } from "@/lib/bench/takes";
import type { SeatReport } from "@/lib/bench/service";
import type { StrokeInput } from "@/lib/validations/bench";
import { SEAT_STATE_LABELS, STAGE_LABELS } from "@/lib/labels";
import dynamic from "next/dynamic";
import { LazyDoneChecks } from "./done-checks-lazy";
import { FadeChart, type ChartStroke } from "./fade-chart";
import { deviceId } from "./device-id";
import { keepOfflineCopy } from "./offline-copy";
import { RecordingUploads } from "./recording-uploads";
import { useListener } from "./use-listener";

type Stage = "coarse" | "fine";

// Photos come after the lapping, below the curve: loaded once the screen is up, not before.
// Links on this screen do not prefetch: the phone's bandwidth is for the strokes.
// "Use a recording" is not needed to listen: loaded once the screen is up, like the photos.
const UseRecording = dynamic(() => import("./use-recording").then((m) => m.UseRecording), {
  loading: () => <div className="h-20 animate-pulse rounded-xl bg-stone-200" />,
});
const SeatPhotos = dynamic(() => import("@/components/review/seat-photos").then((m) => m.SeatPhotos), {
  loading: () => <div className="h-24 animate-pulse rounded-xl bg-stone-200" />,
});

/** Our names for where the fade curve stands, as the technician reads them. */
const VERDICT_LABELS: Record<SeatVerdict["state"], string> = {
  "no-strokes": "No strokes yet",
  fading: "Still fading",
  settled: "Settled",
  "not-settling": "Not settling",
};

async function fetchSeat(seatId: string): Promise<SeatReport> {
  const res = await fetch(`/api/seats/${seatId}`, { headers: { accept: "application/json" } });
  const body = (await res.json().catch(() => null)) as (SeatReport & { message?: string }) | null;
  if (!res.ok || !body) throw new Error(body?.message ?? `The seat could not be loaded (HTTP ${res.status}).`);
  return body;
}

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
  // The server's copy of the seat; refreshed after every save it confirms. Plain fetch keeps the
  // bench screen's first load small.
  const [report, setReport] = useState<SeatReport>(initial);
  const refresh = useCallback(async () => {
    try {
      setReport(await fetchSeat(seatId));
      return true;
    } catch {
      return false; // keep showing the last copy; the sync note says what is pending
    }
  }, [seatId]);
  const defaultStage: Stage = report.stages.coarse.verdict.state === "settled" ? "fine" : "coarse";
  const [stage, setStageState] = useState<Stage>(initialStage ?? defaultStage);
  // The stage lives in the address too, so a reload comes back to the same curve.
  const setStage = useCallback((s: Stage) => {
    setStageState(s);
    window.history.replaceState(null, "", `?stage=${s}`);
  }, []);
  const [record, setRecord] = useState(true);
  const [coarseChosen, setCoarseChosen] = useState(false);
  const [local, setLocal] = useState<PendingStroke[]>([]);
  const [pendingCount, setPendingCount] = useState(0);
  const [syncNote, setSyncNote] = useState<string | null>(null);
  const [refusals, setRefusals] = useState<string[]>([]);
  // Strokes the server failed on too often: kept on this phone, shown until sent again.
  const [setAside, setSetAside] = useState<{ strokes: number; others: number; message: string } | null>(null);
  const [speechHeard, setSpeechHeard] = useState(0);
  const [cue, setCue] = useState<"settled" | "not-settling" | null>(null);
  const [picked, setPicked] = useState<number | null>(null);
  const sessionRef = useRef<string | null>(null);
  const cueShown = useRef<{ settled: boolean; notSettling: boolean }>({ settled: false, notSettling: false });
  const outboxRef = useRef<Outbox | null>(null);
  const stopRef = useRef<(() => Promise<void>) | null>(null);
  const strokeCounter = useRef(0);
  const unread = useRef(false);

  const outbox = useCallback(() => (outboxRef.current ??= new Outbox()), []);
  const takesRef = useRef<Takes | null>(null);
  const takes = useCallback(() => (takesRef.current ??= new Takes()), []);

  const sync = useCallback(async (): Promise<FlushReport["stoppedBy"] | undefined> => {
    let report: FlushReport;
    try {
      report = await outbox().flush();
    } catch {
      setSyncNote("This phone's storage is not available; strokes cannot be kept offline.");
      return;
    }
    setPendingCount(report.pending);
    const aside = await outbox().setAsideOps(seatId);
    setSetAside(
      aside.length
        ? { strokes: aside.filter((op) => op.kind === "stroke").length, others: aside.filter((op) => op.kind !== "stroke").length, message: aside[aside.length - 1]!.setAside! }
        : null,
    );
    if (report.refused.length) setRefusals((r) => [...r, ...report.refused.map((x) => x.message)]);
    // The server refused this phone's session (seat busy, signed off, not yours): stop listening
    // rather than gather strokes that will never count.
    if (report.refused.some((x) => x.op.kind === "session" && x.op.body.sessionId === sessionRef.current)) {
      void stopRef.current?.();
    }
    setSyncNote(
      report.stoppedBy === "offline"
        ? "No network: strokes are kept on this phone and sent when it returns."
        : report.stoppedBy === "signed-out"
          ? "You were signed out. Sign in again in another tab; strokes are kept on this phone."
          : report.stoppedBy === "server"
            ? "The server is busy; strokes are kept and will be resent."
            : null,
    );
    // Sent strokes leave the local list only once the server's copy of the seat has them; a read
    // that failed (the network dropped right after the send) is tried again at the next sync.
    if (report.sent > 0 || (unread.current && report.stoppedBy === "done")) {
      const pending = await outbox().pendingStrokes(seatId);
      unread.current = !(await refresh());
      if (!unread.current) setLocal((l) => l.filter((x) => pending.some((p) => p.stroke.clientId === x.stroke.clientId)));
    }
    return report.stoppedBy;
  }, [outbox, refresh, seatId]);

  // Strokes still in the outbox from before a reload belong on the curve too.
  useEffect(() => {
    let cancelled = false;
    void (async () => {
      try {
        // A recording a reload or crash interrupted goes up with its session.
        await recoverTakes(takes(), outbox()).catch(() => []);
        const pending = await outbox().pendingStrokes(seatId);
        if (!cancelled && pending.length) setLocal(pending);
        // Reloaded offline (from the offline worker's copy): the seat as this phone last read it,
        // which may be newer than the copy of the page.
        if ((await sync()) === "offline") await refresh();
      } catch {
        /* storage unavailable: handled in sync */
      }
    })();
    const online = () => void sync();
    window.addEventListener("online", online);
    const timer = setInterval(() => {
      if (navigator.onLine) void sync();
    }, 5000);
    return () => {
      cancelled = true;
      window.removeEventListener("online", online);
      clearInterval(timer);
    };
  }, [outbox, takes, refresh, seatId, sync]);

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
      setLocal((l) => [...l, { sessionId, stroke }]);
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

  const serverStage = report.stages[stage];
  const combined = useMemo(() => {
    const known = new Set(serverStage.strokes.map((s) => s.clientId));
    const sessionsOfStage = new Set(serverStage.sessions.map((s) => s.id));
    const mine = local.filter(
      (l) =>
        !known.has(l.stroke.clientId) && (sessionsOfStage.has(l.sessionId) || l.sessionId === sessionRef.current || l.stage === stage),
    );
    const all: Array<ChartStroke & { flags: string[]; startS: number }> = [
      ...serverStage.strokes.map((s) => ({ n: s.n, contrastDb: s.contrastDb, flags: s.flags, startS: s.startS })),
      ...mine.map((m, i) => ({
        n: serverStage.strokes.length + i + 1,
        contrastDb: m.stroke.contrastDb,
        flags: m.stroke.flags,
        startS: m.stroke.startS,
        pending: true,
      })),
    ];
    return { all, pending: mine.length };
  }, [serverStage, local, stage]);

  const preview = useMemo(
    () => judgeSeat(combined.all.map((s) => ({ contrastDb: s.contrastDb, index: s.n, flags: s.flags, startS: s.startS }))),
    [combined.all],
  );
  // Runs after the curve has been committed with the new point.
  const drawn = combined.all.length;
  useEffect(() => {
    const received = performance.getEntriesByName("grindfade:stroke-received", "mark").at(-1) as PerformanceMark | undefined;
    if (!received || drawn === 0) return;
    const detectionMs = (received.detail as { detectionMs?: number } | null)?.detectionMs ?? 0;
    requestAnimationFrame(() =>
      performance.measure("grindfade:stroke-to-curve", { start: received.startTime, end: performance.now(), detail: { detectionMs, strokes: drawn } }),
    );
    performance.clearMarks("grindfade:stroke-received");
  }, [drawn]);

  const waitingToSync = combined.pending > 0 || pendingCount > 0;
  const verdict: SeatVerdict = combined.pending > 0 ? preview : serverStage.verdict;
  const last = combined.all[combined.all.length - 1];
  const lastFlags = last?.flags ?? [];
  const leftOut = combined.all.filter((s) => s.flags.length > 0);
  const leftOutLine = leftOutSummary(verdict);
  const pickedStroke = picked === null ? undefined : combined.all.find((s) => s.n === picked);
  // With strokes heard but none judged, "no strokes yet" would contradict the counter.
  const verdictLabel = verdict.state === "no-strokes" && combined.all.length > 0 ? "Nothing judged yet" : VERDICT_LABELS[verdict.state];

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
    if (verdict.state === "settled" && !cueShown.current.settled && (listener.phase === "listening" || combined.pending > 0)) {
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
  }, [verdict.state, listener.phase, combined.pending, stopListening]);

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
    setRefusals([]);
    setSpeechHeard(0);
    setPicked(null);
    cueShown.current = { settled: report.stages[at].verdict.state === "settled", notSettling: false };
    const sessionId = crypto.randomUUID();
    sessionRef.current = sessionId;
    strokeCounter.current = 0;
    const ok = await listener.start({ record, take: { sessionId, seatId } });
    if (!ok) {
      sessionRef.current = null;
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
  const busyRefusal = refusals.find((r) => /busy/i.test(r));

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
            className={`min-h-14 rounded-xl border-2 text-lg font-bold disabled:opacity-60 ${
              stage === s ? "border-ink bg-ink text-white" : "border-stone-400 bg-white"
            }`}
          >
            {STAGE_LABELS[s]}
            <span className="block text-xs font-normal">{VERDICT_LABELS[report.stages[s].verdict.state]}</span>
          </button>
        ))}
      </div>

      <section aria-live="polite" className="grid grid-cols-3 gap-2 rounded-2xl bg-ink p-3 text-white">
        <div>
          <div className="text-sm text-stone-300">Strokes</div>
          <div className="figure text-4xl font-bold" data-testid="stroke-count">
            {combined.all.length}
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

      {!report.canWork ? (
        <p className="rounded-xl border border-stone-300 bg-stone-100 p-3 text-sm">
          This seat is read-only for you
          {report.seat.state === "approved" ? ": it is signed off." : ": the job is assigned to someone else or your role only reads."}
        </p>
      ) : (
        <div className="flex flex-col gap-2" data-testid="bench-actions">
          {listener.phase === "calibrating" ? (
            <p className="rounded-xl bg-amber-400 p-3 text-center text-xl font-bold text-ink" data-testid="calibrating">
              {listener.calibrationNote === "measuring-again"
                ? "Something was heard — stay quiet, measuring the room again…"
                : listener.calibrationNote === "quieter"
                  ? "The room is quieter than it was measured — stay quiet, measuring it again…"
                  : "Stay quiet — measuring the room…"}
            </p>
          ) : null}
          {listener.phase === "listening" && listener.calibrationNote === "quiet-part" ? (
            <p className="rounded-xl bg-amber-100 p-2 text-center text-sm text-amber-900" data-testid="calibration-note">
              The room was not quiet while it was measured; its quiet moments were used. Tap Re-measure room when the bay is quiet.
            </p>
          ) : null}
          {listening ? (
            <div className="grid grid-cols-3 gap-2">
              <button
                type="button"
                onClick={listener.recalibrate}
                disabled={listener.phase !== "listening"}
                className="min-h-16 rounded-2xl border-2 border-ink bg-white text-base font-bold disabled:opacity-50"
              >
                Re-measure room
              </button>
              <button
                type="button"
                onClick={() => void stop()}
                className="col-span-2 min-h-16 rounded-2xl bg-rose-700 text-xl font-bold text-white"
              >
                Stop listening
              </button>
            </div>
          ) : seatDone ? (
            <>
              {/* Fine compound has settled: the seat is lapped; the next step is the next seat, not more lapping. */}
              <Link
                prefetch={false}
                href={report.nextSeatId ? `/bench/${report.nextSeatId}` : `/jobs/${report.job.id}`}
                className="flex min-h-16 items-center justify-center rounded-2xl bg-emerald-700 text-xl font-bold text-white"
                data-testid="next-step"
              >
                {report.nextSeatId ? "Seat lapped — next seat →" : "Seat lapped — back to the seat map"}
              </Link>
              <button type="button" onClick={() => void startListening()} className="min-h-11 text-sm font-semibold text-stone-600 underline underline-offset-2">
                Listen to this seat again
              </button>
            </>
          ) : (
            <>
              <label className="flex min-h-12 items-center gap-3 rounded-xl bg-white px-3 text-base">
                <input type="checkbox" checked={record} onChange={(e) => setRecord(e.target.checked)} className="h-6 w-6" />
                Record the session for the supervisor
              </label>
              <button
                type="button"
                onClick={() => void startListening(fineOffered ? "fine" : stage)}
                className="min-h-16 rounded-2xl bg-emerald-700 text-xl font-bold text-white"
                data-testid="start-listening"
              >
                {listener.error ? "Try again" : `Listen — ${STAGE_LABELS[fineOffered ? "fine" : stage].toLowerCase()}`}
              </button>
              {fineOffered ? <p className="text-center text-sm text-stone-600">Coarse compound has settled: clean it off, then lap with fine.</p> : null}
            </>
          )}
        </div>
      )}

      {report.sentBack ? (
        <div role="note" className="rounded-xl border-2 border-rose-400 bg-rose-50 p-3 text-rose-950" data-testid="sent-back-reason">
          <p className="font-bold">Sent back by {report.sentBack.by}</p>
          <p className="mt-1">{report.sentBack.comment}</p>
        </div>
      ) : null}

      <div className="rounded-2xl border border-stone-300 bg-white p-2">
        <FadeChart strokes={combined.all} fit={verdict.fit} thresholdDb={verdict.rule.maxContrastDb} onPick={setPicked} />
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
                <button
                  type="button"
                  onClick={() => setPicked(s.n)}
                  aria-pressed={picked === s.n}
                  className="min-h-11 rounded-full border-2 border-stone-500 bg-white px-3 text-sm"
                >
                  <span className="figure font-semibold">#{s.n}</span> {flagText(s.flags[0]!)}
                </button>
              </li>
            ))}
          </ul>
        ) : null}
      </div>

      <div aria-live="polite" className="flex flex-col gap-2">
        {waitingToSync ? (
          <p className="rounded-lg bg-sky-100 px-3 py-2 text-sm font-semibold text-sky-900" data-testid="sync-state">
            Waiting to sync {Math.max(combined.pending, pendingCount)} item{Math.max(combined.pending, pendingCount) === 1 ? "" : "s"} — the server&apos;s verdict counts.
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
            <button
              type="button"
              className="min-h-11 rounded-lg border border-rose-400 bg-white px-3 font-semibold"
              onClick={() => void outbox().retrySetAside(seatId).then(sync)}
            >
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
        {listener.processing.length ? (
          <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900" data-testid="processing-warning">
            This browser kept {listener.processing.map((p) => p.label).join(", ")} on. It can fade a steady sound and make
            the curve unreliable; some phones force it. Try another browser, or a wired microphone.
          </p>
        ) : null}
        {lastFlags.includes("too-quiet") ? (
          <p className="rounded-lg bg-amber-100 px-3 py-2 text-sm text-amber-900">
            Too quiet to judge: move the phone closer to the head (about a hand&apos;s width).
          </p>
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
        {listener.error ? (
          <div role="alert" className="rounded-xl border border-rose-300 bg-rose-50 p-3 text-rose-900" data-testid="listen-error">
            <p className="font-semibold">{listener.error}</p>
          </div>
        ) : null}
      </div>

      {!listening ? <LazyDoneChecks seatId={seatId} canWork={report.canWork} settled={report.stages.fine.verdict.state === "settled"} /> : null}
      {!listening && report.canWork ? (
        <UseRecording
          seatId={seatId}
          stage={stage}
          earlier={combined.all.map((x) => ({ contrastDb: x.contrastDb, flags: x.flags, startS: x.startS }))}
          disabled={listener.phase !== "idle"}
          outbox={outbox}
          sync={sync}
        />
      ) : null}
      {!listening ? <SeatPhotos seatId={seatId} canAdd={report.canWork} /> : null}

      <details className="rounded-xl border border-stone-300 bg-white p-3 text-sm">
        <summary className="min-h-11 py-2.5 cursor-pointer font-semibold">Cautions</summary>
        <ul className="mt-2 list-disc pl-5 text-stone-700">
          <li>Wear eye protection; lapping compound and grit can fly.</li>
          <li>Keep compound off the stem and guide; clean every trace afterwards with solvent, with ventilation and nitrile gloves, away from flames.</li>
          <li>Lift and turn the valve between strokes; never spin it with a drill. Some coated valves must not be lapped: check the engine maker&apos;s instructions.</li>
          <li>The sound is one check. Confirm with an even dull-grey ring on face and seat, and a leak test.</li>
        </ul>
      </details>

      {cue === "settled" ? (
        <div
          role="alertdialog"
          aria-label="Seat settled"
          className="fixed inset-0 z-50 flex flex-col items-center justify-center gap-4 bg-emerald-600 p-6 text-center text-white"
          data-testid="settled-cue"
        >
          <p className="figure text-7xl font-bold">{report.seat.code}</p>
          <p className="text-5xl font-black uppercase tracking-wide">Settled</p>
          <p className="text-xl">
            {stage === "coarse" ? "Coarse compound is done. Clean off, then lap with fine." : "This seat is lapped. Clean off all compound."}
          </p>
          <button type="button" onClick={() => setCue(null)} className="min-h-16 min-w-48 rounded-2xl bg-white px-6 text-xl font-bold text-emerald-800">
            OK
          </button>
        </div>
      ) : null}
      {cue === "not-settling" ? (
        <div role="alertdialog" aria-label="Not settling" className="fixed inset-x-0 bottom-0 z-50 bg-amber-500 p-5 text-ink shadow-2xl" data-testid="not-settling-cue">
          <p className="text-3xl font-black">Not settling</p>
          <p className="mt-1 text-lg">
            The curve has gone flat above the settled zone. More lapping will not help: stop, check the contact ring with marking
            compound, and have the seat (and valve face) checked for recutting.
          </p>
          <button type="button" onClick={() => setCue(null)} className="mt-3 min-h-14 w-full rounded-2xl bg-ink text-lg font-bold text-white">
            Understood
          </button>
        </div>
      ) : null}
    </div>
  );
}
