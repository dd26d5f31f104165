"use server";

import { and, count, eq, inArray, sql } from "drizzle-orm";
import { revalidatePath } from "next/cache";
import { getDb } from "@/db/client";
import { customers, engineSpecs, heads, jobs, lappingSessions, measurements, seats, shops, strokes, users, torqueSheets } from "@/db/schema";
import { requireActor } from "@/lib/auth/guard";
import { assertCanWorkOn } from "@/lib/auth/job-access";
import { recordAudit } from "@/lib/audit";
import { BadRequestError, ConflictError, NotFoundError } from "@/lib/errors";
import { insertCustomer, updateCustomerRecord } from "@/lib/customers/write";
import { createHeadWithSeats } from "@/lib/heads/create";
import { parseId } from "@/lib/http";
import { canMove, isClosed, isReviewDecision } from "@/lib/jobs/lifecycle";
import { handIn, isFinished, takeBack } from "@/lib/jobs/hand-in";
import { jobFormSchema, jobStatusChangeSchema, takeBackSchema, type JobFormValues } from "@/lib/validations/jobs";
import { actionFailure, type ActionState } from "./state";


export type JobActionState = ActionState & { jobId?: string };

function initials(name: string): string {
  const letters = name
    .split(/\s+/)
    .filter(Boolean)
    .map((w) => w[0]!.toUpperCase())
    .join("");
  return (letters || "JOB").slice(0, 4);
}

type Tx = Parameters<Parameters<Awaited<ReturnType<typeof getDb>>["transaction"]>[0]>[0];

/** `keepSpecId`: the engine the job already has, which it keeps even when it is retired. */
async function checkRefs(tx: Tx, actorId: string, shopId: string, v: JobFormValues, keepSpecId: string | null = null): Promise<string> {
  if (v.assignedTechnicianId) {
    const [tech] = await tx
      .select({ role: users.role })
      .from(users)
      .where(and(eq(users.id, v.assignedTechnicianId), eq(users.shopId, shopId)));
    if (!tech || tech.role === "admin") {
      throw new BadRequestError("Assign a technician or supervisor of this shop.", { assignedTechnicianId: ["Not someone who can lap."] });
    }
  }
  if (v.engineSpecId) {
    const [spec] = await tx
      .select({ id: engineSpecs.id, name: engineSpecs.name, retiredAt: engineSpecs.retiredAt })
      .from(engineSpecs)
      .where(and(eq(engineSpecs.id, v.engineSpecId), eq(engineSpecs.shopId, shopId)));
    if (!spec) throw new BadRequestError("That engine is not in your library.", { engineSpecId: ["Choose from the list."] });
    if (spec.retiredAt && spec.id !== keepSpecId) {
      throw new BadRequestError(`${spec.name} is retired from the library: choose another engine.`, { engineSpecId: ["Retired: choose another engine."] });
    }
  }
  if (v.customerId) {
    const [c] = await tx.select({ id: customers.id }).from(customers).where(and(eq(customers.id, v.customerId), eq(customers.shopId, shopId)));
    if (!c) throw new BadRequestError("That customer is not in your shop.", { customerId: ["Choose from the list."] });
    return c.id;
  }
  return newCustomer(tx, actorId, shopId, v);
}

/**
 * The customer typed in the job form: a new record with its contact details, or the shop's
 * customer of that name, whose blank details are filled in from what was typed.
 */
async function newCustomer(tx: Tx, actorId: string, shopId: string, v: JobFormValues): Promise<string> {
  const typed = {
    name: v.newCustomerName,
    contactName: v.newCustomerContactName,
    email: v.newCustomerEmail,
    phone: v.newCustomerPhone,
    address: v.newCustomerAddress,
  };
  const [existing] = await tx
    .select()
    .from(customers)
    .where(and(eq(customers.shopId, shopId), eq(customers.name, v.newCustomerName)));
  if (!existing) return insertCustomer(tx, actorId, shopId, typed);
  await updateCustomerRecord(tx, actorId, shopId, existing.id, {
    name: existing.name,
    contactName: existing.contactName ?? typed.contactName,
    email: existing.email ?? typed.email,
    phone: existing.phone ?? typed.phone,
    address: existing.address ?? typed.address,
  });
  return existing.id;
}

export async function createJob(input: unknown): Promise<JobActionState> {
  try {
    const actor = await requireActor("jobs:manage");
    const v = jobFormSchema.parse(input);
    const db = await getDb();
    const jobId = await db.transaction(async (tx) => {
      const customerId = await checkRefs(tx, actor.id, actor.shopId, v);
      const [shop] = await tx.select({ name: shops.name }).from(shops).where(eq(shops.id, actor.shopId));
      const prefix = initials(shop?.name ?? "");
      const [{ n }] = (await tx.select({ n: count() }).from(jobs).where(eq(jobs.shopId, actor.shopId))) as [{ n: number }];
      let number = `${prefix}-${String(n + 141).padStart(4, "0")}`;
      for (let k = 1; (await tx.select({ id: jobs.id }).from(jobs).where(eq(jobs.number, number))).length; k++) {
        number = `${prefix}-${String(n + 141 + k).padStart(4, "0")}`;
      }
      const [job] = await tx
        .insert(jobs)
        .values({
          shopId: actor.shopId,
          number,
          customerId,
          engineDescription: v.engineDescription,
          engineSpecId: v.engineSpecId,
          promisedOn: v.promisedOn,
          assignedTechnicianId: v.assignedTechnicianId,
          notes: v.notes || null,
        })
        .returning({ id: jobs.id });
      await createHeadWithSeats(tx, job!.id, v.headLabel, v);
      await recordAudit(tx, {
        actorId: actor.id,
        action: "job.created",
        entityType: "job",
        entityId: job!.id,
        jobId: job!.id,
        after: { number, engine: v.engineDescription, layout: `${v.arrangement}${v.cylinderCount}` },
      });
      return job!.id;
    });
    revalidatePath("/jobs");
    return { ok: true, message: "Job booked in.", fieldErrors: {}, jobId };
  } catch (err) {
    return actionFailure(err);
  }
}

export async function updateJob(jobId: string, input: unknown): Promise<JobActionState> {
  try {
    const actor = await requireActor("jobs:manage");
    parseId(jobId, "The job id");
    const v = jobFormSchema.parse(input);
    const db = await getDb();
    await db.transaction(async (tx) => {
      const [before] = await tx.select().from(jobs).where(and(eq(jobs.id, jobId), eq(jobs.shopId, actor.shopId))).for("update");
      if (!before) throw new NotFoundError("That job does not exist in your shop.");
      if (isClosed(before.status)) throw new ConflictError(`Job ${before.number} is signed off; a supervisor must reopen it before it is edited.`);
      const customerId = await checkRefs(tx, actor.id, actor.shopId, v, before.engineSpecId);
      await tx
        .update(jobs)
        .set({
          customerId,
          engineDescription: v.engineDescription,
          engineSpecId: v.engineSpecId,
          promisedOn: v.promisedOn,
          assignedTechnicianId: v.assignedTechnicianId,
          notes: v.notes || null,
          updatedAt: new Date(),
        })
        .where(eq(jobs.id, jobId));
      const [head] = await tx.select().from(heads).where(eq(heads.jobId, jobId)).limit(1);
      const layoutChanged =
        !head ||
        head.arrangement !== v.arrangement ||
        head.cylinderCount !== v.cylinderCount ||
        head.intakeValvesPerCylinder !== v.intakeValvesPerCylinder ||
        head.exhaustValvesPerCylinder !== v.exhaustValvesPerCylinder ||
        head.camshaftCount !== v.camshaftCount ||
        head.journalsPerCamshaft !== v.journalsPerCamshaft;
      if (head && layoutChanged) {
        // The layout can change only while nothing has been recorded against its seats and journals.
        const seatIds = (await tx.select({ id: seats.id }).from(seats).where(eq(seats.headId, head.id))).map((s) => s.id);
        const [{ lapped }] = (await tx
          .select({ lapped: sql<number>`count(*)::int` })
          .from(strokes)
          .innerJoin(lappingSessions, eq(lappingSessions.id, strokes.sessionId))
          .where(seatIds.length ? inArray(lappingSessions.seatId, seatIds) : sql`false`)) as [{ lapped: number }];
        const [{ measured }] = (await tx
          .select({ measured: sql<number>`count(*)::int` })
          .from(measurements)
          .where(eq(measurements.headId, head.id))) as [{ measured: number }];
        const [{ sheets }] = (await tx
          .select({ sheets: sql<number>`count(*)::int` })
          .from(torqueSheets)
          .where(eq(torqueSheets.headId, head.id))) as [{ sheets: number }];
        if (lapped + measured + sheets > 0) {
          throw new ConflictError("The head's layout cannot change: strokes or measurements are already recorded against it.");
        }
        await tx.delete(heads).where(eq(heads.id, head.id));
      }
      if (!head || layoutChanged) await createHeadWithSeats(tx, jobId, v.headLabel, v);
      else if (head.label !== v.headLabel) await tx.update(heads).set({ label: v.headLabel }).where(eq(heads.id, head.id));
      await recordAudit(tx, {
        actorId: actor.id,
        action: "job.edited",
        entityType: "job",
        entityId: jobId,
        jobId,
        before: { engine: before.engineDescription, technician: before.assignedTechnicianId, promisedOn: before.promisedOn },
        after: { engine: v.engineDescription, technician: v.assignedTechnicianId, promisedOn: v.promisedOn, layoutChanged },
      });
    });
    revalidatePath(`/jobs/${jobId}`);
    revalidatePath("/jobs");
    return { ok: true, message: "Job saved.", fieldErrors: {}, jobId };
  } catch (err) {
    return actionFailure(err);
  }
}

export async function changeJobStatus(_prev: ActionState, formData: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:read");
    const { jobId, to, confirmUnfinished } = jobStatusChangeSchema.parse({
      jobId: formData.get("jobId"),
      to: formData.get("to"),
      confirmUnfinished: formData.get("confirmUnfinished"),
    });
    const db = await getDb();
    if (to === "awaiting_audit") {
      // Handing in has its own guard: what is unfinished is named and must be confirmed.
      const unfinished = await handIn(db, actor, { jobId, confirmUnfinished });
      revalidatePath(`/jobs/${jobId}`);
      revalidatePath("/jobs");
      return { ok: true, message: isFinished(unfinished) ? "Handed in for audit." : "Handed in for audit, unfinished work noted.", fieldErrors: {} };
    }
    await db.transaction(async (tx) => {
      const [job] = await tx.select().from(jobs).where(and(eq(jobs.id, jobId), eq(jobs.shopId, actor.shopId))).for("update");
      if (!job) throw new NotFoundError("That job does not exist in your shop.");
      // A technician moves only the jobs they may work on (assigned to them, or to nobody).
      if (actor.role === "technician") assertCanWorkOn(actor, job);
      if (isReviewDecision(job.status, to)) {
        throw new ConflictError(
          `Job ${job.number} is signed off, sent back or reopened only by a supervisor's review, with a comment or a reason: use the review panel on the job page.`,
        );
      }
      if (!canMove(job.status, to, actor.role)) {
        throw new ConflictError(`A ${actor.role} cannot move job ${job.number} from ${job.status.replace("_", " ")} to ${to.replace("_", " ")}.`);
      }
      await tx.update(jobs).set({ status: to, updatedAt: new Date() }).where(eq(jobs.id, jobId));
      await recordAudit(tx, {
        actorId: actor.id,
        action: "job.status_changed",
        entityType: "job",
        entityId: jobId,
        jobId,
        before: { status: job.status },
        after: { status: to },
      });
    });
    revalidatePath(`/jobs/${jobId}`);
    revalidatePath("/jobs");
    return { ok: true, message: "Status changed.", fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}

export async function takeHeadBack(_prev: ActionState, formData: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:work");
    const { jobId } = takeBackSchema.parse({ jobId: formData.get("jobId") });
    await takeBack(await getDb(), actor, { jobId });
    revalidatePath(`/jobs/${jobId}`);
    revalidatePath("/jobs");
    return { ok: true, message: "Taken back to the bench.", fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}
