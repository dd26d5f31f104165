// The customer's report, opened from the link in the sign-off mail without an account. The token
// is the only key: it opens one job's report (200), an expired or revoked one answers 410 and an
// unknown or altered one 404, each with one plain sentence and nothing of the report. Every
// opening, refused or not, is in the job's audit trail (lib/report/customer-links.ts).
import { getDb } from "@/db/client";
import { openCustomerLink } from "@/lib/report/customer-links";
import { loadCustomerReport } from "@/lib/report/customer-report-data";
import { customerReportHtml, linkRefusalHtml } from "@/lib/report/customer-report-html";

export const dynamic = "force-dynamic";

function html(status: number, body: string): Response {
  return new Response(body, {
    status,
    headers: {
      "content-type": "text/html; charset=utf-8",
      // A private record behind a secret address: never cached, indexed or passed on as a referrer.
      "cache-control": "no-store",
      "referrer-policy": "no-referrer",
      "x-robots-tag": "noindex, nofollow",
    },
  });
}

export async function GET(_req: Request, ctx: RouteContext<"/r/[token]">): Promise<Response> {
  const { token } = await ctx.params;
  const db = await getDb();
  const opening = await openCustomerLink(db, token);
  if (opening.kind === "unknown") return html(404, linkRefusalHtml("unknown"));
  if (opening.kind === "gone") return html(410, linkRefusalHtml(opening.why));
  return html(200, customerReportHtml(await loadCustomerReport(db, opening.link.jobId)));
}
