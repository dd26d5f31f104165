// A job's life cycle, in our own names: booked in (queued), on the bench, handed in for audit,
// signed off, collected by the customer. Who may move it where is decided here, once.
import type { JobStatus, UserRole } from "@/db/schema";

// Sending a head back, signing it off and reopening it are not status moves: they are the
// supervisor's review decisions (lib/review/service.ts), which need every seat approved, a comment
// or a reason, and leave a review record and the report mail. A plain move would skip all that.
const MOVES: Record<JobStatus, ReadonlyArray<{ to: JobStatus; roles: readonly UserRole[]; label: string }>> = {
  queued: [{ to: "at_bench", roles: ["technician", "supervisor", "admin"], label: "Put on the bench" }],
  at_bench: [
    { to: "awaiting_audit", roles: ["technician", "supervisor"], label: "Hand in for audit" },
    { to: "queued", roles: ["supervisor", "admin"], label: "Back to the queue" },
  ],
  awaiting_audit: [],
  signed_off: [{ to: "collected", roles: ["supervisor", "admin"], label: "Mark collected" }],
  collected: [],
};

/** A change of status that only a review decision makes: send back, sign off, reopen. */
export function isReviewDecision(from: JobStatus, to: JobStatus): boolean {
  return (from === "awaiting_audit" && (to === "at_bench" || to === "signed_off")) || (from === "signed_off" && to === "at_bench");
}

export function allowedMoves(from: JobStatus, role: UserRole) {
  return MOVES[from].filter((m) => m.roles.includes(role));
}

export function canMove(from: JobStatus, to: JobStatus, role: UserRole): boolean {
  return allowedMoves(from, role).some((m) => m.to === to);
}

/** A head whose job is signed off or collected is read-only until a supervisor reopens it. */
export function isClosed(status: JobStatus): boolean {
  return status === "signed_off" || status === "collected";
}
