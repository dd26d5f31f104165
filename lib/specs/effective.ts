// The specification a job works to: the engine library's figure unless the job overrides it,
// with where each value came from, so the report can say so.
import { and, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { jobSpecOverrides, jobs, specValues, type EnteredFigures } from "@/db/schema";
import type { SpecKey } from "./keys";

export interface EffectiveSpec {
  key: SpecKey;
  min: number | null;
  max: number | null;
  limit: number | null;
  nominal: number | null;
  unit: string;
  /** The unit and figures as typed (a manual in inches or lbf·ft); null when typed in SI before units were kept. */
  enteredUnit: string | null;
  entered: EnteredFigures | null;
  source: "library" | "job_override";
  note: string | null;
}

type Reader = Pick<Db, "select">;

export async function effectiveSpecs(db: Reader, jobId: string): Promise<Map<SpecKey, EffectiveSpec>> {
  const out = new Map<SpecKey, EffectiveSpec>();
  const [job] = await db.select({ engineSpecId: jobs.engineSpecId }).from(jobs).where(eq(jobs.id, jobId)).limit(1);
  if (job?.engineSpecId) {
    const rows = await db.select().from(specValues).where(eq(specValues.engineSpecId, job.engineSpecId));
    for (const r of rows) {
      out.set(r.key as SpecKey, {
        key: r.key as SpecKey,
        min: r.minValue,
        max: r.maxValue,
        limit: r.limitValue,
        nominal: r.nominalValue,
        unit: r.unit,
        enteredUnit: r.enteredUnit,
        entered: r.enteredText,
        source: "library",
        note: r.note,
      });
    }
  }
  const overrides = await db.select().from(jobSpecOverrides).where(eq(jobSpecOverrides.jobId, jobId));
  for (const r of overrides) {
    out.set(r.key as SpecKey, {
      key: r.key as SpecKey,
      min: r.minValue,
      max: r.maxValue,
      limit: r.limitValue,
      nominal: r.nominalValue,
      unit: r.unit,
      enteredUnit: r.enteredUnit,
      entered: r.enteredText,
      source: "job_override",
      note: r.reason,
    });
  }
  return out;
}

export async function effectiveSpec(db: Reader, jobId: string, key: SpecKey): Promise<EffectiveSpec | null> {
  return (await effectiveSpecs(db, jobId)).get(key) ?? null;
}

export async function overrideExists(db: Reader, jobId: string, key: SpecKey): Promise<boolean> {
  const rows = await db
    .select({ id: jobSpecOverrides.id })
    .from(jobSpecOverrides)
    .where(and(eq(jobSpecOverrides.jobId, jobId), eq(jobSpecOverrides.key, key)))
    .limit(1);
  return rows.length > 0;
}
