// The e-mail sent when a head is signed off: a short note to the customer (greeted by the
// contact person of a business, else by name), the link that opens the report without an
// account, and the report itself as a PDF; a copy goes to the supervisor who signed off.
import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { customers, jobs, users } from "@/db/schema";
import { createCustomerLink } from "@/lib/report/customer-links";
import { loadCustomerReport } from "@/lib/report/customer-report-data";
import { renderReportPdf, reportPdfName } from "@/lib/report/pdf";
import { formatWhen } from "@/lib/dates";
import { enqueueMail } from "./outbox";

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

export interface HeadReportMail {
  mailId: string | null;
  /** Where the report went: the customer's address (when on file) and the supervisor's. */
  recipients: string[];
  customerEmail: string | null;
  customerName: string;
  linkUrl: string;
  linkExpiresAt: Date;
}

const validEmail = (e: string | null | undefined): e is string => Boolean(e && e.includes("@"));

/**
 * Makes the customer's link and queues the sign-off mail with its PDF, inside the sign-off's
 * transaction: the link, the mail and the sign-off land together or not at all.
 */
export async function queueHeadReportMail(tx: Tx, jobId: string, supervisorId: string, comment: string): Promise<HeadReportMail> {
  const [row] = await tx
    .select({ number: jobs.number, engine: jobs.engineDescription, customerEmail: customers.email })
    .from(jobs)
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .where(eq(jobs.id, jobId));
  const [sup] = await tx.select({ name: users.name, email: users.email }).from(users).where(eq(users.id, supervisorId));
  const link = await createCustomerLink(tx, { jobId, createdById: supervisorId });
  // Read through the transaction, so the report shows the sign-off being made.
  const report = await loadCustomerReport(tx as unknown as Db, jobId);
  const customerEmail = validEmail(row?.customerEmail) ? row!.customerEmail!.trim().toLowerCase() : null;
  const recipients = [...new Set([customerEmail, sup?.email].filter(validEmail).map((e) => e.trim().toLowerCase()))];
  const base = { recipients, customerEmail, customerName: report.customer.name, linkUrl: link.url, linkExpiresAt: link.expiresAt };
  if (!row || recipients.length === 0) return { mailId: null, ...base };

  const supName = sup?.name ?? "the supervisor";
  const until = formatWhen(link.expiresAt, report.shop.timeZone);
  const shopLine = [report.shop.name, report.shop.address, report.shop.phone ? `Telephone ${report.shop.phone}` : null].filter(Boolean).join(" · ");
  const reason = report.signOff?.incompleteReason ?? null;
  const subject = `Head report ${row.number}: signed off`;
  const text = [
    `Dear ${report.customer.greeting},`,
    "",
    `The cylinder head work on job ${row.number} (${row.engine}) has been finished and signed off by ${supName}.`,
    `Supervisor's note: ${comment}`,
    ...(reason ? [`Signed off with parts of the record incomplete (${report.signOff!.incompleteItems.join(" ")}). Reason: ${reason}`] : []),
    "",
    `Your report — each valve seat's lapping, explained, with the clearance and torque checks — is attached as a PDF and can also be opened here until ${until}, without an account:`,
    link.url,
    "",
    "Please follow the engine maker's figures and instructions when the head is refitted.",
    "",
    shopLine,
  ].join("\n");
  const html = `<p>Dear ${escape(report.customer.greeting)},</p>
<p>The cylinder head work on job <strong>${escape(row.number)}</strong> (${escape(row.engine)}) has been finished and signed off by ${escape(supName)}.</p>
<p>Supervisor's note: ${escape(comment)}</p>
${reason ? `<p>Signed off with parts of the record incomplete (${escape(report.signOff!.incompleteItems.join(" "))}). Reason: ${escape(reason)}</p>\n` : ""}<p>Your report — each valve seat's lapping, explained, with the clearance and torque checks — is attached as a PDF and can also be <a href="${escape(link.url)}">opened here</a> until ${escape(until)}, without an account:<br>${escape(link.url)}</p>
<p>Please follow the engine maker's figures and instructions when the head is refitted.</p>
<p>${escape(shopLine)}</p>`;
  const pdf = await renderReportPdf(report);
  const mailId = await enqueueMail(tx, {
    kind: "head_report",
    jobId,
    recipients,
    subject,
    html,
    text,
    createdById: supervisorId,
    attachment: { filename: reportPdfName(row.number), contentType: "application/pdf", content: pdf },
  });
  return { mailId, ...base };
}
