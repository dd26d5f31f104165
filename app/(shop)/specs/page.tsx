import type { Metadata } from "next";
import Link from "next/link";
import { asc, eq, inArray } from "drizzle-orm";
import { getDb } from "@/db/client";
import { engineSpecs, jobSpecOverrides, specValues, type SpecValue } from "@/db/schema";
import {
  EngineSpecSettings,
  NewEngineSpecForm,
  SpecFigureForm,
} from "@/components/specs/spec-forms";
import { Cautions } from "@/components/sheets/cautions";
import { requireActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { isClosed } from "@/lib/jobs/lifecycle";
import { JOB_STATUS_LABELS } from "@/lib/labels";
import { SPEC_KEY_LIST, SPEC_KEYS, type SpecKey } from "@/lib/specs/keys";
import { formatSi, unitLabel } from "@/lib/specs/units";
import { affectedSentence, jobsUsingSpecs } from "@/lib/specs/usage";

export const metadata: Metadata = { title: "Specifications" };

const FIELDS = ["min", "max", "limit", "nominal"] as const;
const COLUMN: Record<
  (typeof FIELDS)[number],
  "minValue" | "maxValue" | "limitValue" | "nominalValue"
> = {
  min: "minValue",
  max: "maxValue",
  limit: "limitValue",
  nominal: "nominalValue",
};

/** A figure as the manual gave it, with its SI value beside it when it was typed in another unit. */
function Figure({ v, field }: { v: SpecValue; field: (typeof FIELDS)[number] }) {
  const si = v[COLUMN[field]];
  if (si === null) return <span className="text-stone-400">—</span>;
  const quantity = SPEC_KEYS[v.key as SpecKey]?.quantity ?? "length";
  const typed = v.enteredText?.[field];
  if (v.enteredUnit && typed !== undefined && v.enteredUnit !== v.unit) {
    return (
      <span>
        {typed} {unitLabel(v.enteredUnit)}{" "}
        <span className="block text-xs text-stone-500">{formatSi(quantity, si)}</span>
      </span>
    );
  }
  return (
    <span>
      {typed ?? String(si)} {v.unit}
    </span>
  );
}

export default async function SpecsPage() {
  const actor = await requireActor("jobs:read");
  const db = await getDb();
  const specs = await db
    .select()
    .from(engineSpecs)
    .where(eq(engineSpecs.shopId, actor.shopId))
    .orderBy(asc(engineSpecs.retiredAt), asc(engineSpecs.name));
  const ids = specs.map((s) => s.id);
  const values = ids.length
    ? await db.select().from(specValues).where(inArray(specValues.engineSpecId, ids))
    : [];
  const usage = await jobsUsingSpecs(db, actor.shopId, ids);
  const openIds = [...usage.values()]
    .flat()
    .filter((j) => !isClosed(j.status))
    .map((j) => j.id);
  const overrides = openIds.length
    ? await db
        .select({ jobId: jobSpecOverrides.jobId, key: jobSpecOverrides.key })
        .from(jobSpecOverrides)
        .where(inArray(jobSpecOverrides.jobId, openIds))
    : [];
  const manage = can(actor.role, "specs:manage");
  return (
    <div className="flex flex-col gap-4">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">Specifications library</h1>
        <p className="text-stone-600">
          Each engine&apos;s figures, saved once and used by every job on that engine, in the unit
          the manual gives them (kept in SI for the checks). A job can override a figure; its sheets
          say which was used.
        </p>
      </div>
      {manage ? (
        <section
          className="rounded-xl border border-stone-300 bg-white p-4"
          aria-label="Add an engine"
        >
          <NewEngineSpecForm />
        </section>
      ) : null}
      {specs.length === 0 ? (
        <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center">
          No engines in the library yet.
        </p>
      ) : null}
      {specs.map((s) => {
        const jobsOn = usage.get(s.id) ?? [];
        const open = jobsOn.filter((j) => !isClosed(j.status));
        const affected: Partial<Record<SpecKey, string>> = {};
        for (const key of SPEC_KEY_LIST) {
          affected[key] = affectedSentence(
            open.filter((j) => !overrides.some((o) => o.jobId === j.id && o.key === key)),
            false,
          );
        }
        return (
          <section
            key={s.id}
            id={`spec-${s.id}`}
            className={`rounded-xl border border-stone-300 p-4 ${s.retiredAt ? "bg-stone-50" : "bg-white"}`}
            aria-label={s.name}
          >
            <h2 className="text-lg font-semibold">
              {s.name}
              {s.retiredAt ? (
                <span className="ml-2 rounded bg-stone-200 px-1.5 py-0.5 text-sm font-semibold text-stone-700">
                  Retired
                </span>
              ) : null}
            </h2>
            {s.source ? <p className="text-sm text-stone-500">Source: {s.source}</p> : null}
            <div className="mt-2 overflow-x-auto">
              <table className="w-full text-left text-sm">
                <thead className="bg-stone-100">
                  <tr>
                    <th className="px-2 py-1">Figure</th>
                    <th className="px-2 py-1">Min</th>
                    <th className="px-2 py-1">Max</th>
                    <th className="px-2 py-1">Limit</th>
                    <th className="px-2 py-1">Value</th>
                  </tr>
                </thead>
                <tbody>
                  {values
                    .filter((v) => v.engineSpecId === s.id)
                    .map((v) => (
                      <tr key={v.id} className="border-t border-stone-200" data-figure={v.key}>
                        <td className="px-2 py-1">{SPEC_KEYS[v.key as SpecKey]?.label ?? v.key}</td>
                        {FIELDS.map((f) => (
                          <td key={f} className="figure px-2 py-1">
                            <Figure v={v} field={f} />
                          </td>
                        ))}
                      </tr>
                    ))}
                </tbody>
              </table>
            </div>
            <div className="mt-2 text-sm" data-testid="spec-jobs">
              {jobsOn.length === 0 ? (
                <p className="text-stone-600">No job uses this engine yet.</p>
              ) : (
                <p>
                  Jobs on this engine:{" "}
                  {jobsOn.map((j, i) => (
                    <span key={j.id}>
                      {i > 0 ? ", " : null}
                      <Link
                        href={`/jobs/${j.id}`}
                        className="figure font-semibold underline underline-offset-2"
                      >
                        {j.number}
                      </Link>{" "}
                      <span className="text-stone-600">
                        ({JOB_STATUS_LABELS[j.status].toLowerCase()})
                      </span>
                    </span>
                  ))}
                </p>
              )}
            </div>
            {manage ? (
              <>
                <details className="mt-2">
                  <summary className="min-h-11 cursor-pointer py-2.5 font-semibold">
                    Add or change a figure
                  </summary>
                  <SpecFigureForm
                    target={{ kind: "library", engineSpecId: s.id }}
                    affected={affected}
                  />
                </details>
                <details className="mt-1">
                  <summary className="min-h-11 cursor-pointer py-2.5 font-semibold">
                    Rename or retire
                  </summary>
                  <EngineSpecSettings id={s.id} name={s.name} retired={s.retiredAt !== null} />
                </details>
              </>
            ) : null}
          </section>
        );
      })}
      <Cautions />
    </div>
  );
}
