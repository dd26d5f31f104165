import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import { getShopTimeZone } from "@/db/queries/shops";
import { formatWhen } from "@/lib/dates";
import { getDb } from "@/db/client";
import type { MailOutboxRow } from "@/db/schema";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { listShopMail } from "@/lib/mail/outbox";
import { SendAgainButton } from "./send-again-button";

export const metadata: Metadata = { title: "Outbox" };

const STATUS: Record<MailOutboxRow["status"], { label: string; className: string }> = {
  queued: { label: "Waiting to go", className: "bg-stone-200" },
  sending: { label: "Going out", className: "bg-sky-100 text-sky-900" },
  sent: { label: "Sent", className: "bg-emerald-100 text-emerald-900" },
  failed: { label: "Failed", className: "bg-rose-100 text-rose-900" },
};


export default async function OutboxPage() {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "users:manage")) forbidden();
  const db = await getDb();
  const mail = await listShopMail(db, actor.shopId);
  const timeZone = await getShopTimeZone(db, actor.shopId);
  return (
    <div className="flex flex-col gap-6">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">Outbox</h1>
        <p className="text-stone-600">
          Every message Grindfade sends, newest first. A message that cannot be delivered is tried again after 1, 5,
          25 and 125 minutes, then marked failed.
        </p>
      </div>
      {mail.length === 0 ? (
        <p className="rounded-xl border border-dashed border-stone-400 bg-white p-6 text-center text-stone-600" data-testid="outbox-empty">
          Nothing has been sent yet. Head reports appear here once they are e-mailed.
        </p>
      ) : (
        <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white">
          <table className="w-full text-left text-sm" data-testid="outbox-table">
            <thead className="border-b border-stone-300 bg-stone-50">
              <tr>
                <th scope="col" className="p-3">When</th>
                <th scope="col" className="p-3">Kind</th>
                <th scope="col" className="p-3">To</th>
                <th scope="col" className="p-3">Subject</th>
                <th scope="col" className="p-3">Status</th>
                <th scope="col" className="p-3">Attempts</th>
                <th scope="col" className="p-3">Last error</th>
                <th scope="col" className="p-3"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {mail.map((m) => {
                const status = STATUS[m.status];
                return (
                  <tr key={m.id} className="border-b border-stone-200 align-top last:border-0">
                    <td className="whitespace-nowrap p-3">
                      {formatWhen(m.sentAt ?? m.createdAt, timeZone)}
                      {m.status === "queued" && m.attempts > 0 ? (
                        <div className="text-stone-600">next try {formatWhen(m.nextAttemptAt, timeZone)}</div>
                      ) : null}
                    </td>
                    <td className="p-3">{m.kind}</td>
                    <td className="p-3">{m.recipients.join(", ")}</td>
                    <td className="p-3">{m.subject}</td>
                    <td className="p-3">
                      <span className={`rounded-full px-2.5 py-1 font-semibold ${status.className}`}>{status.label}</span>
                    </td>
                    <td className="p-3 tabular-nums">{m.attempts}</td>
                    <td className="max-w-xs break-words p-3 text-stone-700">{m.lastError ?? "—"}</td>
                    <td className="p-3">{m.status === "failed" ? <SendAgainButton id={m.id} /> : null}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
