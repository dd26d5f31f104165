// Display names for our states. Kept in one place so every screen says the same thing.
import type { JobStatus, SeatState, LappingStage } from "@/db/schema";

export const JOB_STATUS_LABELS: Record<JobStatus, string> = {
  queued: "Queued",
  at_bench: "At the bench",
  awaiting_audit: "Awaiting audit",
  signed_off: "Signed off",
  collected: "Collected",
};

export const JOB_STATUS_TONES: Record<JobStatus, string> = {
  queued: "bg-stone-200 text-stone-800",
  at_bench: "bg-sky-100 text-sky-900",
  awaiting_audit: "bg-amber-100 text-amber-900",
  signed_off: "bg-emerald-100 text-emerald-900",
  collected: "bg-stone-100 text-stone-600",
};

export const SEAT_STATE_LABELS: Record<SeatState, string> = {
  waiting: "Waiting",
  lapping: "Lapping",
  settled: "Settled",
  stalled: "Stalled — check the seat",
  approved: "Approved",
  sent_back: "Sent back",
};

export const SEAT_STATE_TONES: Record<SeatState, string> = {
  waiting: "bg-stone-100 text-stone-700 ring-stone-300",
  lapping: "bg-sky-100 text-sky-900 ring-sky-300",
  settled: "bg-emerald-100 text-emerald-900 ring-emerald-300",
  stalled: "bg-amber-100 text-amber-900 ring-amber-400",
  approved: "bg-teal-700 text-white ring-teal-800",
  sent_back: "bg-rose-100 text-rose-900 ring-rose-300",
};

export const STAGE_LABELS: Record<LappingStage, string> = {
  coarse: "Coarse compound",
  fine: "Fine compound",
};
