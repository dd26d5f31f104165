// The mail outbox: a message is written to mail_outbox first and sent by the worker afterwards,
// so a slow or unreachable mail server never holds up the action that produced the mail, and a
// failed send is retried instead of lost.
import { and, desc, eq, lte, or, sql } from "drizzle-orm";
import type { Transporter } from "nodemailer";
import { z } from "zod";
import type { Db } from "@/db/client";
import { jobs, mailOutbox, users, type MailOutboxRow } from "@/db/schema";

/** After this many failed sends in a row a message stops being retried and shows as failed. */
export const MAX_ATTEMPTS = 5;
/**
 * While a worker sends a message, the row's next attempt is pushed this far ahead. If the worker
 * dies mid-send the message becomes due again after the lease, instead of staying stuck in
 * "sending" for ever (it may then go out twice, which beats never).
 */
export const SENDING_LEASE_MS = 10 * 60_000;

export const enqueueMailSchema = z.object({
  kind: z.string().trim().min(1, "Say what kind of mail this is.").max(60),
  jobId: z.uuid().nullish(),
  recipients: z
    // Trimmed and lower-cased before the check, so a pasted " Name@Shop.test" is accepted.
    .array(z.string().trim().toLowerCase().pipe(z.email("Each recipient must be a valid e-mail address.")))
    .min(1, "Give at least one recipient.")
    .max(20, "At most 20 recipients per message.")
    // The same address twice would only deliver the same message twice.
    .transform((list) => [...new Set(list)]),
  subject: z.string().trim().min(1, "Give the message a subject.").max(200, "Keep the subject to 200 characters."),
  html: z.string().min(1),
  text: z.string().min(1),
  createdById: z.uuid().nullish(),
  // One file sent with the message, stored with it so a retry sends the same bytes.
  attachment: z
    .object({
      filename: z.string().trim().min(1).max(200).regex(/^[^/\\\r\n]+$/, "A file name, without folders."),
      contentType: z.string().trim().min(3).max(100),
      content: z.instanceof(Buffer).refine((b) => b.byteLength > 0 && b.byteLength <= 10 * 1024 * 1024, "An attachment of 1 byte to 10 MB."),
    })
    .nullish(),
});

export type EnqueueMailInput = z.input<typeof enqueueMailSchema>;

type Writer = Pick<Db, "insert">;

/** Puts a message in the outbox, due at once. Accepts a transaction so a mail lands with its change. */
export async function enqueueMail(db: Writer, input: EnqueueMailInput): Promise<string> {
  const data = enqueueMailSchema.parse(input);
  const [row] = await db
    .insert(mailOutbox)
    .values({
      kind: data.kind,
      jobId: data.jobId ?? null,
      recipients: data.recipients,
      subject: data.subject,
      html: data.html,
      text: data.text,
      createdById: data.createdById ?? null,
      attachmentName: data.attachment?.filename ?? null,
      attachmentType: data.attachment?.contentType ?? null,
      attachment: data.attachment?.content ?? null,
    })
    .returning({ id: mailOutbox.id });
  return row!.id;
}

/** Minutes until the next try after the given number of failed sends: 1, 5, 25, 125… */
export function backoffMs(failures: number): number {
  return 5 ** Math.max(0, failures - 1) * 60_000;
}

export type MailSender = Pick<Transporter, "sendMail">;

export interface ProcessResult {
  sent: number;
  retrying: number;
  failed: number;
}

const due = (now: Date) =>
  and(or(eq(mailOutbox.status, "queued"), eq(mailOutbox.status, "sending")), lte(mailOutbox.nextAttemptAt, now));

/**
 * Claims one due message. The claim is a single UPDATE whose WHERE repeats the due condition, so
 * when two workers pick the same row only one of them gets it back. A claim is a send tried, so it
 * counts an attempt whatever comes of it (a worker that dies mid-send still tried).
 */
async function claimNext(db: Db, now: Date): Promise<MailOutboxRow | null> {
  for (;;) {
    const [candidate] = await db
      .select({ id: mailOutbox.id })
      .from(mailOutbox)
      .where(due(now))
      .orderBy(mailOutbox.nextAttemptAt, mailOutbox.createdAt)
      .limit(1);
    if (!candidate) return null;
    const [claimed] = await db
      .update(mailOutbox)
      .set({ status: "sending", attempts: sql`${mailOutbox.attempts} + 1`, nextAttemptAt: new Date(now.getTime() + SENDING_LEASE_MS) })
      .where(and(eq(mailOutbox.id, candidate.id), due(now)))
      .returning();
    if (claimed) return claimed;
    // Someone else claimed it between our read and our write: look for the next one.
  }
}

function describeError(err: unknown): string {
  const message = err instanceof Error ? err.message : String(err);
  return message.slice(0, 500) || "The mail server refused the message without saying why.";
}

/** Sends every message that is due, one at a time, and records each outcome on its row. */
export async function processDueMail(
  db: Db,
  transport: MailSender,
  now: Date = new Date(),
  opts: { from?: string; limit?: number } = {},
): Promise<ProcessResult> {
  const from = opts.from ?? "Grindfade <no-reply@grindfade.local>";
  const limit = opts.limit ?? 50;
  const result: ProcessResult = { sent: 0, retrying: 0, failed: 0 };
  for (let i = 0; i < limit; i++) {
    const row = await claimNext(db, now);
    if (!row) break;
    try {
      const attachments =
        row.attachment && row.attachmentName
          ? [{ filename: row.attachmentName, contentType: row.attachmentType ?? "application/octet-stream", content: row.attachment }]
          : undefined;
      await transport.sendMail({ from, to: row.recipients, subject: row.subject, html: row.html, text: row.text, attachments });
      await db
        .update(mailOutbox)
        .set({ status: "sent", sentAt: new Date(), lastError: null })
        .where(and(eq(mailOutbox.id, row.id), eq(mailOutbox.status, "sending")));
      result.sent++;
    } catch (err) {
      const failures = row.failures + 1;
      const failed = failures >= MAX_ATTEMPTS;
      await db
        .update(mailOutbox)
        .set({
          status: failed ? "failed" : "queued",
          failures,
          lastError: describeError(err),
          nextAttemptAt: new Date(now.getTime() + backoffMs(failures)),
        })
        .where(and(eq(mailOutbox.id, row.id), eq(mailOutbox.status, "sending")));
      if (failed) result.failed++;
      else result.retrying++;
    }
  }
  return result;
}

/**
 * An admin's "send again": a failed message goes back to the queue, due now, with its failures
 * cleared for the back-off; its attempts keep counting every send tried.
 */
export async function retryMail(db: Pick<Db, "update">, id: string, now: Date = new Date()): Promise<boolean> {
  const [row] = await db
    .update(mailOutbox)
    .set({ status: "queued", failures: 0, nextAttemptAt: now })
    .where(and(eq(mailOutbox.id, id), eq(mailOutbox.status, "failed")))
    .returning({ id: mailOutbox.id });
  return Boolean(row);
}

/**
 * A shop's mail, newest first. The outbox has no shop column, so a message belongs to the shop of
 * its job or, without a job, of the person who queued it.
 */
export async function listShopMail(db: Db, shopId: string, limit = 200) {
  return db
    .select({
      id: mailOutbox.id,
      kind: mailOutbox.kind,
      recipients: mailOutbox.recipients,
      subject: mailOutbox.subject,
      status: mailOutbox.status,
      attempts: mailOutbox.attempts,
      failures: mailOutbox.failures,
      lastError: mailOutbox.lastError,
      nextAttemptAt: mailOutbox.nextAttemptAt,
      sentAt: mailOutbox.sentAt,
      createdAt: mailOutbox.createdAt,
    })
    .from(mailOutbox)
    .leftJoin(jobs, eq(jobs.id, mailOutbox.jobId))
    .leftJoin(users, eq(users.id, mailOutbox.createdById))
    .where(sql`coalesce(${jobs.shopId}, ${users.shopId}) = ${shopId}`)
    .orderBy(desc(mailOutbox.createdAt))
    .limit(limit);
}

export async function mailBelongsToShop(db: Db, id: string, shopId: string): Promise<boolean> {
  const [row] = await db
    .select({ id: mailOutbox.id })
    .from(mailOutbox)
    .leftJoin(jobs, eq(jobs.id, mailOutbox.jobId))
    .leftJoin(users, eq(users.id, mailOutbox.createdById))
    .where(and(eq(mailOutbox.id, id), sql`coalesce(${jobs.shopId}, ${users.shopId}) = ${shopId}`))
    .limit(1);
  return Boolean(row);
}

/** One message of the shop's outbox as it was sent (or will be): null when it is not the shop's. */
export async function getShopMail(db: Db, shopId: string, id: string) {
  const [row] = await db
    .select({ mail: mailOutbox, jobNumber: jobs.number, createdByName: users.name })
    .from(mailOutbox)
    .leftJoin(jobs, eq(jobs.id, mailOutbox.jobId))
    .leftJoin(users, eq(users.id, mailOutbox.createdById))
    .where(and(eq(mailOutbox.id, id), sql`coalesce(${jobs.shopId}, ${users.shopId}) = ${shopId}`))
    .limit(1);
  return row ? { ...row.mail, jobNumber: row.jobNumber, createdByName: row.createdByName } : null;
}

/** The kinds of mail Grindfade sends, by name; a kind not listed here reads as itself, made readable. */
export const MAIL_KIND_NAMES: Record<string, string> = {
  head_report: "Head report to customer",
};

export function mailKindName(kind: string): string {
  const named = MAIL_KIND_NAMES[kind];
  if (named) return named;
  const words = kind.replace(/[_.-]+/g, " ").trim();
  return words ? words[0]!.toUpperCase() + words.slice(1) : "Message";
}

/** The web links in a message's HTML (href) and text, in order, each once: what the recipient can open. */
export function linksInMail(mail: { html: string; text: string }): string[] {
  const found: string[] = [];
  const decode = (v: string) => v.replace(/&amp;/g, "&").replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&lt;/g, "<").replace(/&gt;/g, ">");
  for (const m of mail.html.matchAll(/href\s*=\s*("([^"]*)"|'([^']*)')/gi)) found.push(decode(m[2] ?? m[3] ?? ""));
  for (const m of mail.text.matchAll(/https?:\/\/[^\s<>"']+/gi)) found.push(m[0]);
  return [...new Set(found.filter((l) => /^https?:\/\//i.test(l)))];
}
