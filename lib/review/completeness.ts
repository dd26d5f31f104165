// What a head's record still lacks before it is signed off: seats not approved, journal
// clearances not measured, cap torque sheets not set up or not finished, done-checks not recorded
// or not passed, seats without a contact-ring photo. The sign-off panel lists these, and the
// server (lib/review/service.ts) reads the same list inside the sign-off's transaction: seats not
// approved refuse the sign-off; anything else needs the supervisor's reason, which the report
// prints under the sign-off.
import { and, asc, eq, inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { customers, heads, jobs, seatPhotos, seats } from "@/db/schema";
import { doneChecksOf, shortfallText } from "@/lib/bench/done-checks";
import { NotFoundError } from "@/lib/errors";
import { getClearanceSheet, getTorqueSheets } from "@/lib/heads/sheets";
import { seatCode } from "@/lib/heads/layout";

export type GapKind = "seats" | "clearance" | "torque" | "done_checks" | "photos";

export interface SignOffGap {
  kind: GapKind;
  /** One line in words, as the panel lists it and the review stores it. */
  text: string;
  /** Finer lines under it (one per seat or camshaft), for the panel. */
  details: string[];
}

export interface HeadCompleteness {
  /** Seats not approved: the head cannot be signed off until this is empty. */
  unapprovedSeatCodes: string[];
  /** Everything incomplete, seats included, in the order the panel lists it. */
  gaps: SignOffGap[];
  /** Something other than seats is incomplete: signing off needs a reason. */
  needsReason: boolean;
  customer: { name: string; greeting: string; email: string | null };
}

/** What the panel says counts as photographed; the check below keeps to it. */
export const PHOTO_RULE = "each seat needs at least one contact-ring photo";

/** The name to greet a customer by: the contact person of a business, else the customer. */
export function greetingName(c: { name: string; contactName: string | null }): string {
  return c.contactName?.trim() || c.name;
}

const list = (items: string[], max = 12) => (items.length > max ? `${items.slice(0, max).join(", ")} and ${items.length - max} more` : items.join(", "));

/**
 * The head's record as it stands, read with the given reader (a transaction at sign-off). Throws
 * NotFoundError for a job outside the shop.
 */
export async function headCompleteness(db: Db, shopId: string, jobId: string): Promise<HeadCompleteness> {
  const [job] = await db
    .select({ id: jobs.id, customerName: customers.name, contactName: customers.contactName, email: customers.email })
    .from(jobs)
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .where(and(eq(jobs.id, jobId), eq(jobs.shopId, shopId)))
    .limit(1);
  if (!job) throw new NotFoundError("That job does not exist in your shop.");
  const seatRows = (
    await db
      .select({ seat: seats })
      .from(seats)
      .innerJoin(heads, eq(heads.id, seats.headId))
      .where(eq(heads.jobId, jobId))
      .orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position))
  ).map((r) => r.seat);
  const gaps: SignOffGap[] = [];

  const unapproved = seatRows.filter((s) => s.state !== "approved").map((s) => seatCode(s));
  if (unapproved.length > 0) {
    gaps.push({ kind: "seats", text: `Seats not approved: ${list(unapproved)}.`, details: [] });
  }

  const [clearance, torque] = seatRows.length
    ? await Promise.all([getClearanceSheet(db, shopId, jobId), getTorqueSheets(db, shopId, jobId)]).catch((err) => {
        if (err instanceof NotFoundError) return [null, null] as const;
        throw err;
      })
    : [null, null];

  if (clearance) {
    const details: string[] = [];
    let count = 0;
    for (const c of clearance.camshafts) {
      const open = c.journals.filter((j) => !j.reading || j.reading.offScale);
      count += open.length;
      if (open.length) details.push(`${c.label}: journal${open.length === 1 ? "" : "s"} ${open.map((j) => j.position).join(", ")}`);
    }
    if (count > 0) gaps.push({ kind: "clearance", text: `Journal clearances not measured: ${count} of ${clearance.camshafts.reduce((n, c) => n + c.journals.length, 0)}.`, details });
  }

  if (torque) {
    const notSetUp = torque.camshafts.filter((c) => !c.sheet).map((c) => c.label);
    const unfinished = torque.camshafts
      .filter((c) => c.sheet && c.sheet.next !== null)
      .map((c) => `${c.label} (${c.sheet!.ticks.length} of ${c.sheet!.order.length * c.sheet!.stages.length} ticks)`);
    if (notSetUp.length) gaps.push({ kind: "torque", text: `Cap torque sheet not set up: ${notSetUp.join(", ")}.`, details: [] });
    if (unfinished.length) gaps.push({ kind: "torque", text: `Cap torque sheet not finished: ${unfinished.join(", ")}.`, details: [] });
  }

  if (seatRows.length) {
    const checks = await doneChecksOf(db, jobId, seatRows);
    const short = seatRows.map((s) => checks.get(s.id)!).filter((c) => !c.complete);
    if (short.length) {
      gaps.push({
        kind: "done_checks",
        text: `Done-checks not recorded or not passed: ${list(short.map((c) => c.code))}.`,
        details: short.map((c) => `${c.code}: ${shortfallText(c)}`),
      });
    }
    const ids = seatRows.map((s) => s.id);
    const photographed = new Set(
      (await db.selectDistinct({ seatId: seatPhotos.seatId }).from(seatPhotos).where(inArray(seatPhotos.seatId, ids))).map((r) => r.seatId),
    );
    const noPhoto = seatRows.filter((s) => !photographed.has(s.id)).map((s) => seatCode(s));
    if (noPhoto.length) gaps.push({ kind: "photos", text: `No contact-ring photo: ${list(noPhoto)}.`, details: [] });
  }

  return {
    unapprovedSeatCodes: unapproved,
    gaps,
    needsReason: gaps.some((g) => g.kind !== "seats"),
    customer: {
      name: job.customerName,
      greeting: greetingName({ name: job.customerName, contactName: job.contactName }),
      email: job.email && job.email.includes("@") ? job.email : null,
    },
  };
}
