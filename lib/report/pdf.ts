// The customer's report as a PDF, made on the server with pdfkit (no browser): the shop's name,
// address and phone, the job and customer, each seat's verdicts, the clearance and torque
// summary, the sign-off with its reason when the record was incomplete, and page numbers.
// Uses pdfkit's built-in Helvetica, so no font is read from anywhere but pdfkit itself.
import PDFDocument from "pdfkit";
import { formatWhen } from "@/lib/dates";
import type { CustomerReportData } from "./customer-report-data";
import { REFIT_CAUTION, REPORT_EXPLAINED, SEAT_STATE_WORDS } from "./customer-words";

const MARGIN = 50;
const INK = "#1c1917";
const MUTED = "#57534e";

export const reportPdfName = (jobNumber: string) => `head-report-${jobNumber}.pdf`;

/** The report's bytes. Deterministic apart from the creation date pdfkit writes in its info. */
export function renderReportPdf(data: CustomerReportData, opts: { now?: Date } = {}): Promise<Buffer> {
  const now = opts.now ?? new Date();
  const doc = new PDFDocument({
    size: "A4",
    margins: { top: MARGIN, bottom: MARGIN + 20, left: MARGIN, right: MARGIN },
    bufferPages: true,
    info: { Title: `Head report ${data.job.number}`, Author: data.shop.name, Subject: `${data.job.engine} for ${data.customer.name}`, CreationDate: now },
  });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("data", (c: Buffer) => chunks.push(c));
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });
  const width = doc.page.width - 2 * MARGIN;
  const tz = data.shop.timeZone;

  const heading = (text: string) => {
    if (doc.y > doc.page.height - 160) doc.addPage();
    doc.moveDown(0.8).font("Helvetica-Bold").fontSize(13).fillColor(INK).text(text, MARGIN, doc.y, { width });
    doc.moveDown(0.3).font("Helvetica").fontSize(10);
  };
  const para = (text: string, color = INK) => doc.font("Helvetica").fontSize(10).fillColor(color).text(text, MARGIN, doc.y, { width });

  // The shop, then the job.
  doc.font("Helvetica-Bold").fontSize(18).fillColor(INK).text(data.shop.name, { width });
  doc.font("Helvetica").fontSize(10).fillColor(MUTED);
  if (data.shop.address) doc.text(data.shop.address, { width });
  if (data.shop.phone) doc.text(`Telephone ${data.shop.phone}`, { width });
  doc.moveDown(0.8);
  doc.moveTo(MARGIN, doc.y).lineTo(MARGIN + width, doc.y).strokeColor("#a8a29e").lineWidth(1).stroke();
  doc.moveDown(0.6);
  doc.font("Helvetica-Bold").fontSize(16).fillColor(INK).text(`Head report ${data.job.number}`, MARGIN, doc.y, { width });
  doc.font("Helvetica").fontSize(10).fillColor(INK);
  doc.text(`Customer: ${data.customer.name}`, { width });
  doc.text(`Engine: ${data.job.engine}`, { width });
  doc.text(`Made: ${formatWhen(now, tz)}`, { width });

  heading("What this report shows");
  for (const e of REPORT_EXPLAINED) {
    doc.font("Helvetica-Bold").fontSize(10).fillColor(INK).text(`${e.term}. `, MARGIN, doc.y, { width, continued: true });
    doc.font("Helvetica").text(e.text, { width });
    doc.moveDown(0.25);
  }

  for (const head of data.heads) {
    heading(`${head.label}: the valve seats`);
    para(`${head.summary}. Seats are numbered from the timing end: "2I1" is cylinder 2, intake valve 1; "E" is exhaust.`, MUTED);
    doc.moveDown(0.4);
    const cols = [MARGIN, MARGIN + 50, MARGIN + 200, MARGIN + 330];
    const header = ["Seat", "Where it stands", "Coarse paste", "Fine paste"];
    const row = (cells: string[], bold = false) => {
      if (doc.y > doc.page.height - 110) doc.addPage();
      const y = doc.y;
      doc.font(bold ? "Helvetica-Bold" : "Helvetica").fontSize(9.5).fillColor(INK);
      let bottom = y;
      cells.forEach((c, i) => {
        const w = (i + 1 < cols.length ? cols[i + 1]! : MARGIN + width) - cols[i]! - 6;
        doc.text(c, cols[i]!, y, { width: w });
        bottom = Math.max(bottom, doc.y);
      });
      doc.y = bottom + 3;
      doc.x = MARGIN;
    };
    row(header, true);
    for (const s of head.seats) {
      const stage = (st: { line: string; strokes: number }) => (st.strokes ? `${st.line} (${st.strokes} strokes)` : st.line);
      row([s.code, SEAT_STATE_WORDS[s.state], stage(s.coarse), stage(s.fine)]);
    }
  }

  heading("Camshaft journal clearances");
  if (!data.clearance) para("This head has no camshaft journals to measure.", MUTED);
  else {
    para(
      `${data.clearance.measured} of ${data.clearance.total} journals measured` +
        (data.clearance.spec ? `; the specification is ${data.clearance.spec}.` : "; no specification was given for this engine."),
    );
    doc.moveDown(0.2);
    for (const r of data.clearance.rows) para(`${r.where}: ${r.clearance} (${r.result})`);
  }

  heading("Camshaft cap torque");
  if (data.torque.length === 0) para("This head has no camshaft caps.", MUTED);
  for (const t of data.torque) para(`${t.camshaft}: ${t.line}`);

  heading("Sign-off");
  if (!data.signOff) para("This head has not been signed off.", MUTED);
  else {
    para(`Signed off by ${data.signOff.by} on ${formatWhen(data.signOff.at, tz)}.`);
    para(`Note: ${data.signOff.comment}`);
    if (data.signOff.incompleteItems.length) {
      doc.moveDown(0.3);
      doc.font("Helvetica-Bold").fontSize(10).fillColor(INK).text("Signed off with parts of the record incomplete:", MARGIN, doc.y, { width });
      for (const item of data.signOff.incompleteItems) para(`- ${item}`);
      doc.font("Helvetica-Bold").text("Reason given: ", MARGIN, doc.y, { width, continued: true });
      doc.font("Helvetica").text(data.signOff.incompleteReason ?? "", { width });
    }
  }
  doc.moveDown(0.8);
  para(REFIT_CAUTION, MUTED);

  // Page numbers on every page, in the bottom margin (which pdfkit would otherwise treat as full).
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    doc
      .font("Helvetica")
      .fontSize(8.5)
      .fillColor(MUTED)
      .text(`${data.shop.name} · ${data.job.number} · Page ${i - range.start + 1} of ${range.count}`, MARGIN, doc.page.height - MARGIN, {
        width,
        align: "center",
        lineBreak: false,
      });
    doc.page.margins.bottom = bottom;
  }
  doc.end();
  return done;
}
