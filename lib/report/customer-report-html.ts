// The customer's report as a whole HTML document, for app/r/[token]: outside the signed-in shell,
// with no script at all, every value escaped, and the fade curves drawn as inline SVG. Built as
// text rather than by React so the route can answer the real status (200, 404 or 410) itself.
import { formatWhen } from "@/lib/dates";
import type { CustomerReportData, ReportSeat } from "./customer-report-data";
import { REFIT_CAUTION, REPORT_EXPLAINED, SEAT_STATE_WORDS, seatWords } from "./customer-words";

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

/** The settled rule's ceiling (lib/audio/verdict.ts settledMaxContrastDb), drawn on each curve. */
const SETTLED_DB = 1.5;

const STYLE = `
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { margin: 0; font: 16px/1.5 system-ui, -apple-system, "Segoe UI", sans-serif; color: #1c1917; background: #f5f5f4; }
main { max-width: 52rem; margin: 0 auto; padding: 1.25rem; }
header.shop { border-bottom: 2px solid #1c1917; padding-bottom: .75rem; margin-bottom: 1rem; }
header.shop h1 { margin: 0; font-size: 1.5rem; }
header.shop p { margin: .1rem 0; color: #57534e; }
h2 { font-size: 1.25rem; margin: 1.5rem 0 .5rem; }
section.card { background: #fff; border: 1px solid #d6d3d1; border-radius: .75rem; padding: 1rem; margin: 1rem 0; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: .25rem 1rem; margin: 0; }
dl.facts dt { font-weight: 600; }
dl.facts dd { margin: 0; }
dl.explain dt { font-weight: 700; margin-top: .75rem; }
dl.explain dd { margin: .1rem 0 0; }
table { width: 100%; border-collapse: collapse; font-size: .95rem; }
th, td { text-align: left; padding: .4rem .5rem; border-top: 1px solid #e7e5e4; vertical-align: top; }
thead th { background: #f5f5f4; border-top: 0; }
.code { font-family: "JetBrains Mono", ui-monospace, monospace; font-weight: 700; }
.muted { color: #57534e; font-size: .9rem; }
.warn { background: #fffbeb; border: 1px solid #f59e0b; border-radius: .5rem; padding: .75rem; }
.scroll { overflow-x: auto; }
svg.curve { display: block; }
th .muted { font-weight: 400; }
@media (max-width: 40rem) {
  table.seats thead { display: none; }
  table.seats tr { display: block; border-top: 1px solid #d6d3d1; padding: .5rem 0; }
  table.seats th, table.seats td { display: block; border: 0; padding: .1rem 0; }
  table.seats td[data-label]::before { content: attr(data-label) ": "; font-weight: 600; }
  table.seats td br { display: none; }
  table.seats td .muted::before { content: " · "; }
}
footer { color: #57534e; font-size: .9rem; margin: 2rem 0 1rem; }
@media print { body { background: #fff; } section.card { border: 0; padding: 0; } }
`;

function doc(title: string, body: string): string {
  return `<!doctype html>
<html lang="en-GB">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex, nofollow">
<meta name="referrer" content="no-referrer">
<title>${esc(title)}</title>
<style>${STYLE}</style>
</head>
<body>
<main>
${body}
</main>
</body>
</html>`;
}

/** A small fade curve: the contrast of each stroke (dB), with the settled ceiling dashed. */
function curve(values: number[], label: string): string {
  if (values.length === 0) return `<span class="muted">No strokes</span>`;
  const w = 160;
  const h = 48;
  const top = Math.max(SETTLED_DB * 2, ...values);
  const bottom = Math.min(0, ...values);
  const x = (i: number) => (values.length === 1 ? w / 2 : (i / (values.length - 1)) * (w - 4) + 2);
  const y = (v: number) => h - 2 - ((v - bottom) / (top - bottom || 1)) * (h - 4);
  const points = values.map((v, i) => `${x(i).toFixed(1)},${y(v).toFixed(1)}`).join(" ");
  return `<svg class="curve" role="img" aria-label="${esc(label)}" width="${w}" height="${h}" viewBox="0 0 ${w} ${h}">
<line x1="0" x2="${w}" y1="${y(SETTLED_DB).toFixed(1)}" y2="${y(SETTLED_DB).toFixed(1)}" stroke="#059669" stroke-dasharray="4 3" stroke-width="1"/>
<polyline fill="none" stroke="#1c1917" stroke-width="1.5" points="${points}"/>
</svg>`;
}

function seatRow(s: ReportSeat): string {
  const stage = (st: ReportSeat["coarse"]) => `${esc(st.line)}${st.strokes ? `<br><span class="muted">${st.strokes} strokes</span>` : ""}`;
  const first = s.contrastsDb[0];
  const last = s.contrastsDb[s.contrastsDb.length - 1];
  return `<tr data-seat="${esc(s.code)}">
<th scope="row"><span class="code">${esc(s.code)}</span><br><span class="muted">${esc(seatWords(s))}</span></th>
<td data-label="Where it stands">${esc(SEAT_STATE_WORDS[s.state])}</td>
<td data-label="Coarse paste">${stage(s.coarse)}</td>
<td data-label="Fine paste">${stage(s.fine)}</td>
<td>${curve(s.contrastsDb, `Fade curve of seat ${s.code}: ${s.contrastsDb.length} strokes${first !== undefined && last !== undefined ? `, from ${first.toFixed(1)} dB to ${last.toFixed(1)} dB` : ""}`)}</td>
</tr>`;
}

export function customerReportHtml(data: CustomerReportData, now: Date = new Date()): string {
  const tz = data.shop.timeZone;
  const shop = `<header class="shop">
<h1>${esc(data.shop.name)}</h1>
${data.shop.address ? `<p>${esc(data.shop.address)}</p>` : ""}
${data.shop.phone ? `<p>Telephone ${esc(data.shop.phone)}</p>` : ""}
</header>`;
  const facts = `<section class="card" aria-labelledby="job">
<h2 id="job" style="margin-top:0">Head report ${esc(data.job.number)}</h2>
<dl class="facts">
<dt>Customer</dt><dd>${esc(data.customer.name)}</dd>
<dt>Engine</dt><dd>${esc(data.job.engine)}</dd>
${data.signOff ? `<dt>Signed off</dt><dd>${esc(formatWhen(data.signOff.at, tz))} by ${esc(data.signOff.by)}</dd>` : `<dt>Signed off</dt><dd>Not yet</dd>`}
</dl>
</section>`;
  const explain = `<section class="card" aria-labelledby="explained">
<h2 id="explained" style="margin-top:0">What this report shows</h2>
<dl class="explain">
${REPORT_EXPLAINED.map((e) => `<dt>${esc(e.term)}</dt><dd>${esc(e.text)}</dd>`).join("\n")}
<dt>The curves below</dt><dd>Each line is one seat's fade curve: one point per stroke, falling from left to right. The dashed green line is the ${SETTLED_DB} dB mark a settled seat stays under.</dd>
</dl>
</section>`;
  const headsHtml = data.heads
    .map(
      (h) => `<section class="card" aria-label="${esc(h.label)}">
<h2 style="margin-top:0">${esc(h.label)}: the valve seats</h2>
<p class="muted">${esc(h.summary)}. Seats are numbered from the timing end of the head: <span class="code">2I1</span> is cylinder 2, intake valve 1; <span class="code">E</span> is exhaust.</p>
<div class="scroll"><table class="seats" data-testid="customer-report-seats">
<thead><tr><th scope="col">Seat</th><th scope="col">Where it stands</th><th scope="col">Coarse paste</th><th scope="col">Fine paste</th><th scope="col">Fade curve</th></tr></thead>
<tbody>
${h.seats.map(seatRow).join("\n")}
</tbody></table></div>
</section>`,
    )
    .join("\n");
  const clearance = `<section class="card" aria-labelledby="clearance">
<h2 id="clearance" style="margin-top:0">Camshaft journal clearances</h2>
${
  !data.clearance
    ? `<p class="muted">This head has no camshaft journals to measure.</p>`
    : `<p>${data.clearance.measured} of ${data.clearance.total} journals measured${data.clearance.spec ? `; the specification is <strong>${esc(data.clearance.spec)}</strong>.` : "; no specification was given for this engine."}</p>
<div class="scroll"><table><thead><tr><th scope="col">Journal</th><th scope="col">Clearance</th><th scope="col">Result</th></tr></thead><tbody>
${data.clearance.rows.map((r) => `<tr><th scope="row" style="font-weight:400">${esc(r.where)}</th><td>${esc(r.clearance)}</td><td>${esc(r.result)}</td></tr>`).join("\n")}
</tbody></table></div>`
}
</section>`;
  const torque = `<section class="card" aria-labelledby="torque">
<h2 id="torque" style="margin-top:0">Camshaft cap torque</h2>
${data.torque.length === 0 ? `<p class="muted">This head has no camshaft caps.</p>` : `<ul>${data.torque.map((t) => `<li><strong>${esc(t.camshaft)}</strong>: ${esc(t.line)}</li>`).join("")}</ul>`}
</section>`;
  const signOff = `<section class="card" aria-labelledby="signoff">
<h2 id="signoff" style="margin-top:0">Sign-off</h2>
${
  !data.signOff
    ? `<p class="muted">This head has not been signed off.</p>`
    : `<p>Signed off by ${esc(data.signOff.by)} on ${esc(formatWhen(data.signOff.at, tz))}.</p>
${data.signOff.comment ? `<p>Supervisor's note: ${esc(data.signOff.comment)}</p>` : ""}
${
  data.signOff.incompleteItems.length
    ? `<div class="warn" data-testid="customer-report-incomplete"><p style="margin-top:0"><strong>Signed off with parts of the record incomplete:</strong></p>
<ul>${data.signOff.incompleteItems.map((i) => `<li>${esc(i)}</li>`).join("")}</ul>
<p style="margin-bottom:0"><strong>Reason given:</strong> ${esc(data.signOff.incompleteReason ?? "")}</p></div>`
    : ""
}`
}
</section>`;
  const footer = `<footer>
<p>${esc(REFIT_CAUTION)}</p>
<p>This page was opened through the link the workshop sent you; please do not share it. Shown ${esc(formatWhen(now, tz))}.</p>
</footer>`;
  return doc(`Head report ${data.job.number} · ${data.shop.name}`, [shop, facts, explain, headsHtml, clearance, torque, signOff, footer].join("\n"));
}

/** The answer for an expired or revoked link (410) or one that is no link (404): one plain sentence. */
export function linkRefusalHtml(kind: "expired" | "revoked" | "unknown"): string {
  const sentence = {
    expired: "This report link has expired. Ask the workshop that did the work to send you a new one.",
    revoked: "This report link has been withdrawn by the workshop. Ask them to send you a new one.",
    unknown: "There is no report at this address. Check that the link was copied whole from the e-mail.",
  }[kind];
  return doc(kind === "unknown" ? "Report not found" : "Report link no longer valid", `<h1 style="font-size:1.25rem">${esc(sentence)}</h1>`);
}
