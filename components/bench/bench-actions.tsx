"use client";

// The big buttons: listen, stop, re-measure the room, and what comes after a seat is lapped.
import Link from "next/link";
import { STAGE_LABELS } from "@/lib/labels";
import type { Stage } from "./use-stage-curve";

type CalibrationNote = "measuring-again" | "quieter" | "quiet-part" | string | null | undefined;

export function BenchActions({
  phase,
  calibrationNote,
  hasError,
  listening,
  seatDone,
  fineOffered,
  stage,
  record,
  onRecordChange,
  nextHref,
  hasNextSeat,
  onStart,
  onStop,
  onRecalibrate,
}: {
  phase: string;
  calibrationNote: CalibrationNote;
  hasError: boolean;
  listening: boolean;
  seatDone: boolean;
  fineOffered: boolean;
  stage: Stage;
  record: boolean;
  onRecordChange(record: boolean): void;
  nextHref: string;
  hasNextSeat: boolean;
  onStart(stage: Stage): void;
  onStop(): void;
  onRecalibrate(): void;
}) {
  return (
    <div className="flex flex-col gap-2" data-testid="bench-actions">
      {phase === "calibrating" ? (
        <p className="rounded-xl bg-amber-400 p-3 text-center text-xl font-bold text-ink" data-testid="calibrating">
          {calibrationNote === "measuring-again"
            ? "Something was heard — stay quiet, measuring the room again…"
            : calibrationNote === "quieter"
              ? "The room is quieter than it was measured — stay quiet, measuring it again…"
              : "Stay quiet — measuring the room…"}
        </p>
      ) : null}
      {phase === "listening" && calibrationNote === "quiet-part" ? (
        <p className="rounded-xl bg-amber-100 p-2 text-center text-sm text-amber-900" data-testid="calibration-note">
          The room was not quiet while it was measured; its quiet moments were used. Tap Re-measure room when the bay is quiet.
        </p>
      ) : null}
      {listening ? (
        <div className="grid grid-cols-3 gap-2">
          <button type="button" onClick={onRecalibrate} disabled={phase !== "listening"} className="min-h-16 rounded-2xl border-2 border-ink bg-white text-base font-bold disabled:opacity-50">
            Re-measure room
          </button>
          <button type="button" onClick={onStop} className="col-span-2 min-h-16 rounded-2xl bg-rose-700 text-xl font-bold text-white">
            Stop listening
          </button>
        </div>
      ) : seatDone ? (
        <>
          {/* Fine compound has settled: the seat is lapped; the next step is the next seat, not more lapping. */}
          <Link prefetch={false} href={nextHref} className="flex min-h-16 items-center justify-center rounded-2xl bg-emerald-700 text-xl font-bold text-white" data-testid="next-step">
            {hasNextSeat ? "Seat lapped — next seat →" : "Seat lapped — back to the seat map"}
          </Link>
          <button type="button" onClick={() => onStart(stage)} className="min-h-11 text-sm font-semibold text-stone-600 underline underline-offset-2">
            Listen to this seat again
          </button>
        </>
      ) : (
        <>
          <label className="flex min-h-12 items-center gap-3 rounded-xl bg-white px-3 text-base">
            <input type="checkbox" checked={record} onChange={(e) => onRecordChange(e.target.checked)} className="h-6 w-6" />
            Record the session for the supervisor
          </label>
          <button type="button" onClick={() => onStart(fineOffered ? "fine" : stage)} className="min-h-16 rounded-2xl bg-emerald-700 text-xl font-bold text-white" data-testid="start-listening">
            {hasError ? "Try again" : `Listen — ${STAGE_LABELS[fineOffered ? "fine" : stage].toLowerCase()}`}
          </button>
          {fineOffered ? <p className="text-center text-sm text-stone-600">Coarse compound has settled: clean it off, then lap with fine.</p> : null}
        </>
      )}
    </div>
  );
}
