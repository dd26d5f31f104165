import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import Link from "next/link";
import { z } from "zod";
import { getShopTimeZone } from "@/db/queries/shops";
import { formatWhen } from "@/lib/dates";
import { getDb } from "@/db/client";
import type { MailOutboxRow } from "@/db/schema";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { getShopMail, linksInMail, listShopMail, mailKindName } from "@/lib/mail/outbox";
import { SendAgainButton } from "./send-again-button";

export const metadata: Metadata = { title: "Outbox" };

const STATUS: Record<MailOutboxRow["status"], { label: string; className: string }> = {
  queued: { label: "Waiting to go", className: "bg-stone-200" },
  sending: { label: "Going out", className: "bg-sky-100 text-sky-900" },
  sent: { label: "Sent", className: "bg-emerald-100 text-emerald-900" },
  failed: { label: "Failed", className: "bg-rose-100 text-rose-900" },
};

const times = (n: number) => `${n} ${n === 1 ? "attempt" : "attempts"}`;

/** The status as a sentence: what happened to the message and what happens next. */
function statusSentence(
  m: { status: MailOutboxRow["status"]; attempts: number; failures: number; sentAt: Date | null; nextAttemptAt: Date },
  timeZone: string,
): string {
  switch (m.status) {
    case "sent":
      return `Sent ${m.sentAt ? formatWhen(m.sentAt, timeZone) : ""} after ${times(m.attempts)}.`;
    case "failed":
      return `Not delivered: gave up after ${m.failures} failed ${m.failures === 1 ? "try" : "tries"} in a row (${times(m.attempts)} in all). "Send again" queues it once more.`;
    case "sending":
      return `Going out now (${times(m.attempts)} so far).`;
    default:
      return m.attempts === 0
        ? "Waiting to go with the next send."
        : `Waiting to go: ${times(m.attempts)} so far, next try ${formatWhen(m.nextAttemptAt, timeZone)}.`;
  }
}

const openSchema = z.object({ message: z.uuid().optional() });

export default async function OutboxPage({ searchParams }: PageProps<"/admin/outbox">) {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "users:manage")) forbidden();
  const db = await getDb();
  const mail = await listShopMail(db, actor.shopId);
  const timeZone = await getShopTimeZone(db, actor.shopId);
  const asked = await searchParams;
  const wanted = typeof asked.message === "string" ? asked.message : undefined;
  const parsed = openSchema.safeParse({ message: wanted });
  const opened = parsed.success && parsed.data.message ? await getShopMail(db, actor.shopId, parsed.data.message) : null;
  const openMissing = wanted !== undefined && !opened;
  return (
    <div className="flex flex-col gap-6">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">Outbox</h1>
        <p className="text-stone-600">
          Every message Grindfade sends, newest first. A message that cannot be delivered is tried again after 1, 5,
          25 and 125 minutes, then marked failed.
        </p>
      </div>
      {openMissing ? (
        <p role="alert" className="rounded-xl border border-rose-300 bg-rose-50 p-4 text-rose-900" data-testid="outbox-message-missing">
          That message is not in your shop&apos;s outbox. Choose one from the list below.
        </p>
      ) : null}
      {opened ? <OpenedMessage mail={opened} timeZone={timeZone} /> : null}
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
                <th scope="col" className="p-3">Sends tried</th>
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
                    <td className="p-3">{mailKindName(m.kind)}</td>
                    <td className="p-3">{m.recipients.join(", ")}</td>
                    <td className="p-3">
                      <Link
                        href={`/admin/outbox?message=${m.id}#message`}
                        className="inline-flex min-h-11 items-center font-semibold text-brass-dark underline underline-offset-2"
                        aria-current={opened?.id === m.id ? "true" : undefined}
                      >
                        {m.subject}
                      </Link>
                    </td>
                    <td className="p-3">
                      <span className={`rounded-full px-2.5 py-1 font-semibold ${status.className}`}>{status.label}</span>
                    </td>
                    <td className="p-3 tabular-nums" title="Sends tried, the one that went out included">
                      {m.attempts}
                    </td>
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

type OpenedMail = NonNullable<Awaited<ReturnType<typeof getShopMail>>>;

/**
 * What was sent, as it was sent: the text body as plain text, the HTML body in a sandboxed frame
 * (no scripts, no forms, no navigation, an opaque origin), and the message's links listed where
 * they can be read and opened.
 */
function OpenedMessage({ mail, timeZone }: { mail: OpenedMail; timeZone: string }) {
  const links = linksInMail(mail);
  const status = STATUS[mail.status];
  return (
    <section id="message" aria-labelledby="message-subject" className="flex flex-col gap-3 rounded-xl border-2 border-ink bg-white p-4" data-testid="outbox-message">
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <p className="text-sm font-semibold text-stone-600">{mailKindName(mail.kind)}</p>
          <h2 id="message-subject" className="text-xl font-bold">
            {mail.subject}
          </h2>
        </div>
        <Link href="/admin/outbox" className="inline-flex min-h-11 items-center rounded-lg border border-stone-500 px-4 font-semibold">
          Close
        </Link>
      </div>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
        <dt className="font-semibold">To</dt>
        <dd data-testid="outbox-message-to">{mail.recipients.join(", ")}</dd>
        <dt className="font-semibold">Queued</dt>
        <dd>
          {formatWhen(mail.createdAt, timeZone)}
          {mail.createdByName ? ` by ${mail.createdByName}` : ""}
          {mail.jobNumber ? ` for job ${mail.jobNumber}` : ""}
        </dd>
        <dt className="font-semibold">Status</dt>
        <dd data-testid="outbox-message-status">
          <span className={`mr-2 rounded-full px-2.5 py-0.5 font-semibold ${status.className}`}>{status.label}</span>{" "}
          <span>{statusSentence(mail, timeZone)}</span>
        </dd>
        {mail.lastError ? (
          <>
            <dt className="font-semibold">Last error</dt>
            <dd className="break-words">{mail.lastError}</dd>
          </>
        ) : null}
      </dl>
      <div>
        <h3 className="font-semibold">Links in the message</h3>
        {links.length === 0 ? (
          <p className="text-sm text-stone-600">This message has no links.</p>
        ) : (
          <ul className="flex flex-col gap-1 text-sm" data-testid="outbox-message-links">
            {links.map((l) => (
              <li key={l}>
                <a href={l} className="figure break-all text-brass-dark underline underline-offset-2" rel="noreferrer noopener" target="_blank">
                  {l}
                </a>
              </li>
            ))}
          </ul>
        )}
      </div>
      <div className="flex flex-col gap-1">
        <h3 className="font-semibold">As the recipient sees it (HTML)</h3>
        <iframe
          title={`The message "${mail.subject}" as sent`}
          srcDoc={mail.html}
          sandbox=""
          referrerPolicy="no-referrer"
          className="h-80 w-full rounded-lg border border-stone-300 bg-white"
          data-testid="outbox-message-html"
        />
      </div>
      <details>
        <summary className="min-h-11 cursor-pointer py-2.5 font-semibold">Plain-text version</summary>
        <pre className="whitespace-pre-wrap break-words rounded-lg bg-stone-50 p-3 text-sm" data-testid="outbox-message-text">
          {mail.text}
        </pre>
      </details>
    </section>
  );
}
