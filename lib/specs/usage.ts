// Which jobs use an engine's specification, and which open jobs a change of one figure reaches:
// every job on the engine that is not signed off or collected, except those with their own
// override for that figure (lib/specs/effective.ts reads the override first).
import { and, asc, eq, inArray, notInArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { jobSpecOverrides, jobs, type JobStatus } from "@/db/schema";
import { JOB_STATUS_LABELS } from "@/lib/labels";
import type { SpecKey } from "./keys";

export interface SpecJob {
  id: string;
  number: string;
  status: JobStatus;
}

type Reader = Pick<Db, "select">;

const CLOSED: JobStatus[] = ["signed_off", "collected"];

/** Every job of the shop on these engines, by engine, open and closed alike. */
export async function jobsUsingSpecs(
  db: Reader,
  shopId: string,
  specIds: string[],
): Promise<Map<string, SpecJob[]>> {
  const out = new Map<string, SpecJob[]>();
  if (specIds.length === 0) return out;
  const rows = await db
    .select({ id: jobs.id, number: jobs.number, status: jobs.status, specId: jobs.engineSpecId })
    .from(jobs)
    .where(and(eq(jobs.shopId, shopId), inArray(jobs.engineSpecId, specIds)))
    .orderBy(asc(jobs.number));
  for (const r of rows) {
    const list = out.get(r.specId!) ?? [];
    list.push({ id: r.id, number: r.number, status: r.status });
    out.set(r.specId!, list);
  }
  return out;
}

/** The open jobs whose limits for `key` come from this engine's figure. */
export async function affectedOpenJobs(
  db: Reader,
  shopId: string,
  specId: string,
  key: SpecKey,
): Promise<SpecJob[]> {
  const overridden = db
    .select({ jobId: jobSpecOverrides.jobId })
    .from(jobSpecOverrides)
    .where(eq(jobSpecOverrides.key, key));
  return db
    .select({ id: jobs.id, number: jobs.number, status: jobs.status })
    .from(jobs)
    .where(
      and(
        eq(jobs.shopId, shopId),
        eq(jobs.engineSpecId, specId),
        notInArray(jobs.status, CLOSED),
        notInArray(jobs.id, overridden),
      ),
    )
    .orderBy(asc(jobs.number));
}

/** "MHW-0141 (at the bench) and MHW-0146 (queued)". */
export function listJobs(list: SpecJob[]): string {
  const parts = list.map((j) => `${j.number} (${JOB_STATUS_LABELS[j.status].toLowerCase()})`);
  if (parts.length <= 1) return parts.join("");
  return `${parts.slice(0, -1).join(", ")} and ${parts.at(-1)}`;
}

/** The sentence a figure's form and its saved message carry. */
export function affectedSentence(list: SpecJob[], done: boolean): string {
  if (list.length === 0) return "No open job takes its limits from this figure.";
  return `${done ? "Changed" : "Changes"} the limits for ${listJobs(list)}.`;
}
