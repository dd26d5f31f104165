// The e-mail sent when a head is signed off: a short record for the customer and the
// supervisor, with a link to the full printable report.
import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { customers, jobs, users } from "@/db/schema";
import { enqueueMail } from "./outbox";

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** Queues the sign-off mail inside the sign-off's transaction; returns null when nobody has an address. */
export async function queueHeadReportMail(tx: Tx, jobId: string, supervisorId: string, comment: string): Promise<string | null> {
  const [row] = await tx
    .select({ number: jobs.number, engine: jobs.engineDescription, customerName: customers.name, customerEmail: customers.email })
    .from(jobs)
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .where(eq(jobs.id, jobId));
  const [sup] = await tx.select({ name: users.name, email: users.email }).from(users).where(eq(users.id, supervisorId));
  if (!row) return null;
  const recipients = [row.customerEmail, sup?.email].filter((e): e is string => Boolean(e && e.includes("@")));
  if (recipients.length === 0) return null;
  const base = process.env.NEXTAUTH_URL ?? "http://localhost:3000";
  const link = `${base.replace(/\/$/, "")}/jobs/${jobId}/report`;
  const subject = `Head report ${row.number}: signed off`;
  const text = [
    `${row.customerName},`,
    "",
    `The cylinder head work on job ${row.number} (${row.engine}) has been signed off by ${sup?.name ?? "the supervisor"}.`,
    `Supervisor's note: ${comment}`,
    "",
    `The full record — seat map, each seat's lapping verdicts and fade curves, clearance and torque sheets, and sign-offs — is at ${link}`,
    "",
    "Follow the engine maker's figures and instructions when refitting the head.",
  ].join("\n");
  const html = `<p>${escape(row.customerName)},</p>
<p>The cylinder head work on job <strong>${escape(row.number)}</strong> (${escape(row.engine)}) has been signed off by ${escape(sup?.name ?? "the supervisor")}.</p>
<p>Supervisor's note: ${escape(comment)}</p>
<p>The full record — seat map, each seat's lapping verdicts and fade curves, clearance and torque sheets, and sign-offs — is in the <a href="${escape(link)}">head report</a>.</p>
<p>Follow the engine maker's figures and instructions when refitting the head.</p>`;
  return enqueueMail(tx, { kind: "head_report", jobId, recipients, subject, html, text, createdById: supervisorId });
}
