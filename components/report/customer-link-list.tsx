"use client";

// The customer's links to a job's report: when each was sent, until when it opens, how often it
// was opened, and a supervisor's "Revoke" that stops it at once (audited on the server).
import { useActionState } from "react";
import { submitCustomerLinkRevoke } from "@/lib/actions/review";
import { initialActionState } from "@/lib/actions/state";

export interface CustomerLinkRow {
  id: string;
  status: "live" | "expired" | "revoked";
  sent: string;
  sentBy: string;
  expires: string;
  revoked: string | null;
  revokedBy: string | null;
  openings: number;
  lastOpened: string | null;
}

const STATUS_TEXT = { live: "Opens", expired: "Expired", revoked: "Revoked" } as const;

function RevokeButton({ jobId, linkId, action, pending }: { jobId: string; linkId: string; action: (f: FormData) => void; pending: boolean }) {
  return (
    <form action={action}>
      <input type="hidden" name="jobId" value={jobId} />
      <input type="hidden" name="linkId" value={linkId} />
      <button type="submit" disabled={pending} className="min-h-11 rounded-lg border-2 border-rose-800 bg-white px-3 text-sm font-semibold text-rose-800 disabled:opacity-60">
        Revoke link
      </button>
    </form>
  );
}

export function CustomerLinkList({ jobId, links, canRevoke }: { jobId: string; links: CustomerLinkRow[]; canRevoke: boolean }) {
  // One result for the list, so the message stays once the revoked link's button is gone.
  const [state, action, pending] = useActionState(submitCustomerLinkRevoke, initialActionState);
  return (
    <section aria-labelledby="customer-links" className="flex flex-col gap-2 rounded-xl border border-stone-300 bg-white p-4" data-testid="customer-links">
      <h2 id="customer-links" className="text-lg font-semibold">
        Customer&apos;s report link
      </h2>
      {links.length === 0 ? (
        <p className="text-sm text-stone-600">No link yet: signing off the head sends the customer one.</p>
      ) : (
        <ul className="flex flex-col gap-2">
          {links.map((l) => (
            <li key={l.id} className="flex flex-col gap-1 rounded-lg border border-stone-200 p-2 text-sm" data-link-status={l.status}>
              <p>
                <span className="font-semibold">{STATUS_TEXT[l.status]}</span> · sent {l.sent} by {l.sentBy} ·{" "}
                {l.status === "revoked" ? `revoked ${l.revoked}${l.revokedBy ? ` by ${l.revokedBy}` : ""}` : `${l.status === "live" ? "opens until" : "expired"} ${l.expires}`}
              </p>
              <p className="text-stone-600">
                Opened {l.openings === 0 ? "never" : l.openings === 1 ? "once" : `${l.openings} times`}
                {l.lastOpened ? `, last ${l.lastOpened}` : ""}.
              </p>
              {canRevoke && l.status === "live" ? <RevokeButton jobId={jobId} linkId={l.id} action={action} pending={pending} /> : null}
            </li>
          ))}
        </ul>
      )}
      <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}>
        {state.message}
      </p>
    </section>
  );
}
