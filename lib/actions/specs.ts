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
import { affectedOpenJobs, affectedSentence } from "@/lib/specs/usage";
import { engineSpecSchema, renameEngineSpecSchema, retireEngineSpecSchema, specFigureSchema, type SpecFigure } from "@/lib/validations/specs";
import { storableText } from "@/lib/validations/text";
import { actionFailure, type ActionState } from "./state";

const text = (f: FormData, k: string) => {
  const v = f.get(k);
  return typeof v === "string" ? v : undefined;
};

function figureFrom(f: FormData) {
  return specFigureSchema.parse({
    key: text(f, "key"),
    unit: text(f, "unit"),
    min: text(f, "min"),
    max: text(f, "max"),
    limit: text(f, "limit"),
    nominal: text(f, "nominal"),
    note: text(f, "note") ?? "",
  });
}

/** A validated figure as its columns: SI values in the key's unit, beside the unit and figures as typed. */
function storedFigure(v: SpecFigure) {
  const key = v.key as SpecKey;
  return {
    minValue: v.min ?? null,
    maxValue: v.max ?? null,
    limitValue: v.limit ?? null,
    nominalValue: v.nominal ?? null,
    unit: SPEC_KEYS[key].unit,
    enteredUnit: v.unit,
    enteredText: v.entered,
    note: v.note || null,
  };
}

const isUniqueViolation = (err: unknown) => {
  const e = err as { code?: string; cause?: { code?: string } };
  return e?.code === "23505" || e?.cause?.code === "23505";
};

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
    if (isUniqueViolation(err)) return { ok: false, message: "The library already has that engine.", fieldErrors: { name: ["Already in the library."] } };
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
    const affected = await db.transaction(async (tx) => {
      const [spec] = await tx.select().from(engineSpecs).where(and(eq(engineSpecs.id, specId), eq(engineSpecs.shopId, actor.shopId)));
      if (!spec) throw new NotFoundError("That engine is not in your library.");
      const [before] = await tx.select().from(specValues).where(and(eq(specValues.engineSpecId, specId), eq(specValues.key, key)));
      const values = { ...storedFigure(v), updatedAt: new Date() };
      if (before) await tx.update(specValues).set(values).where(eq(specValues.id, before.id));
      else await tx.insert(specValues).values({ engineSpecId: specId, key, ...values });
      const jobsReached = await affectedOpenJobs(tx, actor.shopId, specId, key);
      await recordAudit(tx, {
        actorId: actor.id,
        action: "spec.figure_saved",
        entityType: "engine_spec",
        entityId: specId,
        before: before
          ? { key, min: before.minValue, max: before.maxValue, limit: before.limitValue, nominal: before.nominalValue, enteredUnit: before.enteredUnit, entered: before.enteredText }
          : null,
        after: {
          key,
          min: values.minValue,
          max: values.maxValue,
          limit: values.limitValue,
          nominal: values.nominalValue,
          enteredUnit: values.enteredUnit,
          entered: values.enteredText,
          openJobs: jobsReached.map((j) => j.number),
        },
      });
      return jobsReached;
    });
    revalidatePath("/specs");
    return { ok: true, message: `${SPEC_KEYS[key].label} saved. ${affectedSentence(affected, true)}`, fieldErrors: {} };
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
      const values = { ...storedFigure(v), reason, updatedAt: new Date() };
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

/** Renames an engine; the jobs on it follow, since they refer to it by id. */
export async function renameEngineSpec(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("specs:manage");
    const v = renameEngineSpecSchema.parse({ id: text(f, "id"), name: text(f, "name") });
    const db = await getDb();
    const before = await db.transaction(async (tx) => {
      const [spec] = await tx
        .select({ name: engineSpecs.name })
        .from(engineSpecs)
        .where(and(eq(engineSpecs.id, v.id), eq(engineSpecs.shopId, actor.shopId)))
        .for("update");
      if (!spec) throw new NotFoundError("That engine is not in your library.");
      if (spec.name === v.name) return spec.name;
      await tx.update(engineSpecs).set({ name: v.name, updatedAt: new Date() }).where(eq(engineSpecs.id, v.id));
      await recordAudit(tx, { actorId: actor.id, action: "spec.renamed", entityType: "engine_spec", entityId: v.id, before: { name: spec.name }, after: { name: v.name } });
      return spec.name;
    });
    revalidatePath("/specs");
    return { ok: true, message: before === v.name ? "The name is unchanged." : `${before} is now called ${v.name}.`, fieldErrors: {} };
  } catch (err) {
    if (isUniqueViolation(err)) return { ok: false, message: "The library already has an engine of that name.", fieldErrors: { name: ["Already in the library."] } };
    return actionFailure(err);
  }
}

/**
 * Retires an engine (not offered for new jobs; the jobs that use it keep it and show it) or
 * brings it back.
 */
export async function setEngineSpecRetired(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("specs:manage");
    const v = retireEngineSpecSchema.parse({ id: text(f, "id"), retired: text(f, "retired") });
    const db = await getDb();
    const name = await db.transaction(async (tx) => {
      const [spec] = await tx
        .select({ name: engineSpecs.name, retiredAt: engineSpecs.retiredAt })
        .from(engineSpecs)
        .where(and(eq(engineSpecs.id, v.id), eq(engineSpecs.shopId, actor.shopId)))
        .for("update");
      if (!spec) throw new NotFoundError("That engine is not in your library.");
      if ((spec.retiredAt !== null) === v.retired) return null;
      const retiredAt = v.retired ? new Date() : null;
      await tx.update(engineSpecs).set({ retiredAt, updatedAt: new Date() }).where(eq(engineSpecs.id, v.id));
      await recordAudit(tx, {
        actorId: actor.id,
        action: v.retired ? "spec.retired" : "spec.reinstated",
        entityType: "engine_spec",
        entityId: v.id,
        before: { name: spec.name, retired: spec.retiredAt !== null },
        after: { name: spec.name, retired: v.retired },
      });
      return spec.name;
    });
    revalidatePath("/specs");
    if (name === null) return { ok: true, message: "Nothing to change.", fieldErrors: {} };
    return {
      ok: true,
      message: v.retired ? `${name} is retired: not offered for new jobs; jobs that use it keep it.` : `${name} is offered for new jobs again.`,
      fieldErrors: {},
    };
  } catch (err) {
    return actionFailure(err);
  }
}
