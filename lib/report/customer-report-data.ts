// The customer's report of one job, as plain data: what the public page (app/r/[token]) and the
// PDF sent at sign-off (lib/report/pdf.ts) both show. Read by the job's id alone, so every query
// here is scoped to that one job: nothing of another job can reach the customer.
import { and, desc, eq, isNull } from "drizzle-orm";
import type { Db } from "@/db/client";
import { customers, heads, jobs, reviews, seats, shops, users, type JobStatus, type SeatState } from "@/db/schema";
import { seatVerdicts } from "@/app/(shop)/jobs/[jobId]/report/seat-verdicts";
import type { SeatVerdict } from "@/lib/audio";
import { usableTimeZone } from "@/lib/dates";
import { NotFoundError } from "@/lib/errors";
import { getClearanceSheet, getTorqueSheets } from "@/lib/heads/sheets";
import { seatCode } from "@/lib/heads/layout";
import { headSummary } from "@/db/queries/jobs";
import { greetingName } from "@/lib/review/completeness";

export interface ReportStage {
  /** "Settled at stroke 12", "Not lapped", … */
  line: string;
  settledAt: number | null;
  strokes: number;
}

export interface ReportSeat {
  code: string;
  kind: "intake" | "exhaust";
  cylinder: number;
  state: SeatState;
  coarse: ReportStage;
  fine: ReportStage;
  /** The fade curve shown: the fine stage's contrasts when lapped fine, else the coarse ones (dB). */
  contrastsDb: number[];
}

export interface CustomerReportData {
  shop: { name: string; address: string | null; phone: string | null; timeZone: string };
  job: { id: string; number: string; engine: string; status: JobStatus };
  customer: { name: string; greeting: string };
  heads: Array<{ label: string; summary: string; seats: ReportSeat[] }>;
  clearance: { spec: string | null; measured: number; total: number; rows: Array<{ where: string; clearance: string; result: string }> } | null;
  torque: Array<{ camshaft: string; line: string; finished: boolean }>;
  signOff: { by: string; at: Date; comment: string | null; incompleteItems: string[]; incompleteReason: string | null } | null;
}

const CLEARANCE_RESULT: Record<string, string> = {
  within_spec: "Within specification",
  tight: "Tight",
  loose: "Loose",
  beyond_limit: "Beyond the service limit",
};

export function stageLine(v: SeatVerdict | undefined): string {
  if (!v || v.state === "no-strokes") return "Not lapped";
  if (v.state === "settled") return `Settled at stroke ${v.settled?.atStroke ?? "?"}`;
  if (v.state === "not-settling") return "Not settling";
  return "Still fading";
}

const stage = (s: { verdict: SeatVerdict; contrastsDb: number[] } | undefined): ReportStage => ({
  line: stageLine(s?.verdict),
  settledAt: s?.verdict.state === "settled" ? (s.verdict.settled?.atStroke ?? null) : null,
  strokes: s?.contrastsDb.length ?? 0,
});

async function orNull<T>(p: Promise<T>): Promise<T | null> {
  try {
    return await p;
  } catch (err) {
    if (err instanceof NotFoundError) return null;
    throw err;
  }
}

/** The report of one job; NotFoundError when there is no such job. */
export async function loadCustomerReport(db: Db, jobId: string): Promise<CustomerReportData> {
  const [row] = await db
    .select({ job: jobs, customer: customers, shop: shops })
    .from(jobs)
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .innerJoin(shops, eq(shops.id, jobs.shopId))
    .where(eq(jobs.id, jobId))
    .limit(1);
  if (!row) throw new NotFoundError("That job does not exist.");
  const { job, customer, shop } = row;

  const headRows = await db.select().from(heads).where(eq(heads.jobId, job.id)).orderBy(heads.createdAt);
  const outHeads: CustomerReportData["heads"] = [];
  for (const h of headRows) {
    const verdicts = await seatVerdicts(db, h.id);
    const seatRows = await db.select().from(seats).where(eq(seats.headId, h.id)).orderBy(seats.cylinder, seats.kind, seats.position);
    outHeads.push({
      label: h.label,
      summary: headSummary(h),
      seats: seatRows.map((s) => {
        const v = verdicts.get(s.id);
        return {
          code: seatCode(s),
          kind: s.kind,
          cylinder: s.cylinder,
          state: s.state,
          coarse: stage(v?.coarse),
          fine: stage(v?.fine),
          contrastsDb: v ? (v.fine.contrastsDb.length ? v.fine.contrastsDb : v.coarse.contrastsDb) : [],
        };
      }),
    });
  }

  const clearanceSheet = headRows.length ? await orNull(getClearanceSheet(db, job.shopId, job.id)) : null;
  const clearance = clearanceSheet && clearanceSheet.camshafts.length
    ? (() => {
        const rows = clearanceSheet.camshafts.flatMap((c) =>
          c.journals.map((j) => ({
            where: `${c.label}, journal ${j.position}`,
            clearance: j.reading && !j.reading.offScale ? `${j.reading.clearanceMm.toFixed(3)} mm` : "—",
            result: j.reading
              ? j.reading.offScale
                ? "Off the gauge's scale: not measured"
                : j.reading.verdict
                  ? (CLEARANCE_RESULT[j.reading.verdict] ?? j.reading.verdict)
                  : "No specification"
              : "Not measured",
          })),
        );
        const spec = clearanceSheet.spec;
        return {
          spec: spec && spec.min !== null && spec.max !== null ? `${spec.min.toFixed(3)}–${spec.max.toFixed(3)} mm` : null,
          measured: clearanceSheet.camshafts.reduce((n, c) => n + c.journals.filter((j) => j.reading && !j.reading.offScale).length, 0),
          total: rows.length,
          rows,
        };
      })()
    : null;

  const torqueSheets = headRows.length ? await orNull(getTorqueSheets(db, job.shopId, job.id)) : null;
  const torque = (torqueSheets?.camshafts ?? []).map((c) => {
    const s = c.sheet;
    if (!s) return { camshaft: c.label, line: "No torque sheet set up.", finished: false };
    const total = s.order.length * s.stages.length;
    const stages = s.stages.map((st) => `${st.nm.toFixed(0)} N·m`).join(", then ");
    return {
      camshaft: c.label,
      line:
        s.next === null
          ? `All ${s.order.length} cap bolts tightened in order, in ${s.stages.length} stage${s.stages.length === 1 ? "" : "s"} (${stages}).`
          : `${s.ticks.length} of ${total} tightening steps recorded: not finished.`,
      finished: s.next === null,
    };
  });

  // The latest decision on the head as a whole, when it is the sign-off.
  const [last] = await db
    .select({ review: reviews, by: users.name })
    .from(reviews)
    .innerJoin(users, eq(users.id, reviews.reviewerId))
    .where(and(eq(reviews.jobId, job.id), isNull(reviews.seatId)))
    .orderBy(desc(reviews.createdAt), desc(reviews.id))
    .limit(1);
  const signOff =
    last && last.review.decision === "approved"
      ? {
          by: last.by,
          at: last.review.createdAt,
          comment: last.review.comment,
          incompleteItems: last.review.incompleteItems ?? [],
          incompleteReason: last.review.incompleteReason,
        }
      : null;

  return {
    shop: { name: shop.name, address: shop.address, phone: shop.phone, timeZone: usableTimeZone(shop.timeZone) },
    job: { id: job.id, number: job.number, engine: job.engineDescription, status: job.status },
    customer: { name: customer.name, greeting: greetingName(customer) },
    heads: outHeads,
    clearance,
    torque,
    signOff,
  };
}
