"use server";

import { and, eq } from "drizzle-orm";
import { revalidatePath } from "next/cache";
import { z } from "zod";
import { getDb } from "@/db/client";
import { engineSpecs, jobs, jobSpecOverrides, specValues } from "@/db/schema";
import { requireActor } from "@/lib/auth/guard";
import { recordAudit } from "@/lib/audit";
import { ConflictError, NotFoundError } from "@/lib/errors";
import { isClosed } from "@/lib/jobs/lifecycle";
import { SPEC_KEYS, type SpecKey } from "@/lib/specs/keys";
import { engineSpecSchema, specFigureSchema } from "@/lib/validations/specs";
import { storableText } from "@/lib/validations/text";
import { actionFailure, type ActionState } from "./state";

const text = (f: FormData, k: string) => {
  const v = f.get(k);
  return typeof v === "string" ? v : undefined;
};

function figureFrom(f: FormData) {
  return specFigureSchema.parse({
    key: text(f, "key"),
    min: text(f, "min"),
    max: text(f, "max"),
    limit: text(f, "limit"),
    nominal: text(f, "nominal"),
    note: text(f, "note") ?? "",
  });
}

export async function createEngineSpec(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("specs:manage");
    const v = engineSpecSchema.parse({ name: text(f, "name"), source: text(f, "source") ?? "" });
    const db = await getDb();
    await db.transaction(async (tx) => {
      const [row] = await tx.insert(engineSpecs).values({ shopId: actor.shopId, name: v.name, source: v.source || null }).returning();
      await recordAudit(tx, { actorId: actor.id, action: "spec.created", entityType: "engine_spec", entityId: row!.id, after: v });
    });
    revalidatePath("/specs");
    return { ok: true, message: `${v.name} added to the library.`, fieldErrors: {} };
  } catch (err) {
    const e = err as { code?: string; cause?: { code?: string } };
    if (e?.code === "23505" || e?.cause?.code === "23505") return { ok: false, message: "The library already has that engine.", fieldErrors: { name: ["Already in the library."] } };
    return actionFailure(err);
  }
}

export async function saveSpecFigure(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("specs:manage");
    const specId = z.string().uuid("Unknown engine.").parse(text(f, "engineSpecId"));
    const v = figureFrom(f);
    const key = v.key as SpecKey;
    const db = await getDb();
    await db.transaction(async (tx) => {
      const [spec] = await tx.select().from(engineSpecs).where(and(eq(engineSpecs.id, specId), eq(engineSpecs.shopId, actor.shopId)));
      if (!spec) throw new NotFoundError("That engine is not in your library.");
      const [before] = await tx.select().from(specValues).where(and(eq(specValues.engineSpecId, specId), eq(specValues.key, key)));
      const values = {
        minValue: v.min ?? null,
        maxValue: v.max ?? null,
        limitValue: v.limit ?? null,
        nominalValue: v.nominal ?? null,
        unit: SPEC_KEYS[key].unit,
        note: v.note || null,
        updatedAt: new Date(),
      };
      if (before) await tx.update(specValues).set(values).where(eq(specValues.id, before.id));
      else await tx.insert(specValues).values({ engineSpecId: specId, key, ...values });
      await recordAudit(tx, {
        actorId: actor.id,
        action: "spec.figure_saved",
        entityType: "engine_spec",
        entityId: specId,
        before: before ? { key, min: before.minValue, max: before.maxValue, limit: before.limitValue, nominal: before.nominalValue } : null,
        after: { key, min: values.minValue, max: values.maxValue, limit: values.limitValue, nominal: values.nominalValue },
      });
    });
    revalidatePath("/specs");
    return { ok: true, message: `${SPEC_KEYS[key].label} saved.`, fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}

export async function saveJobOverride(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("specs:manage");
    const jobId = z.string().uuid("Unknown job.").parse(text(f, "jobId"));
    const { reason } = z
      .object({ reason: storableText(z.string().trim().min(3, "Say why this job differs from the library.").max(300, "Keep the reason under 300 characters.")) })
      .parse({ reason: text(f, "reason") ?? "" });
    const v = figureFrom(f);
    const key = v.key as SpecKey;
    const db = await getDb();
    await db.transaction(async (tx) => {
      const [job] = await tx.select().from(jobs).where(and(eq(jobs.id, jobId), eq(jobs.shopId, actor.shopId))).for("share");
      if (!job) throw new NotFoundError("That job does not exist in your shop.");
      if (isClosed(job.status)) throw new ConflictError(`Job ${job.number} is signed off; its figures are read-only.`);
      const values = {
        minValue: v.min ?? null,
        maxValue: v.max ?? null,
        limitValue: v.limit ?? null,
        nominalValue: v.nominal ?? null,
        unit: SPEC_KEYS[key].unit,
        note: v.note || null,
        reason,
        updatedAt: new Date(),
      };
      await tx
        .insert(jobSpecOverrides)
        .values({ jobId, key, ...values })
        .onConflictDoUpdate({ target: [jobSpecOverrides.jobId, jobSpecOverrides.key], set: values });
      await recordAudit(tx, { actorId: actor.id, action: "spec.job_override", entityType: "job", entityId: jobId, jobId, after: { key, ...values } });
    });
    revalidatePath(`/jobs/${jobId}`);
    return { ok: true, message: `${SPEC_KEYS[key].label} overridden on this job.`, fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}
