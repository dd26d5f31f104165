import type { Metadata } from "next";
import { asc, eq, inArray } from "drizzle-orm";
import { getDb } from "@/db/client";
import { engineSpecs, specValues } from "@/db/schema";
import { NewEngineSpecForm, SpecFigureForm } from "@/components/specs/spec-forms";
import { Cautions } from "@/components/sheets/cautions";
import { requireActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { SPEC_KEYS, type SpecKey } from "@/lib/specs/keys";

export const metadata: Metadata = { title: "Specifications" };

const fmt = (v: number | null) => (v === null ? "—" : String(v));

export default async function SpecsPage() {
  const actor = await requireActor("jobs:read");
  const db = await getDb();
  const specs = await db.select().from(engineSpecs).where(eq(engineSpecs.shopId, actor.shopId)).orderBy(asc(engineSpecs.name));
  const values = specs.length ? await db.select().from(specValues).where(inArray(specValues.engineSpecId, specs.map((s) => s.id))) : [];
  const manage = can(actor.role, "specs:manage");
  return (
    <div className="flex flex-col gap-4">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">Specifications library</h1>
        <p className="text-stone-600">Each engine&apos;s figures, saved once and used by every job on that engine. A job can override a figure; its sheets say which was used.</p>
      </div>
      {manage ? (
        <section className="rounded-xl border border-stone-300 bg-white p-4" aria-label="Add an engine">
          <NewEngineSpecForm />
        </section>
      ) : null}
      {specs.length === 0 ? <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center">No engines in the library yet.</p> : null}
      {specs.map((s) => (
        <section key={s.id} className="rounded-xl border border-stone-300 bg-white p-4" aria-label={s.name}>
          <h2 className="text-lg font-semibold">{s.name}</h2>
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
                  <th className="px-2 py-1">Unit</th>
                </tr>
              </thead>
              <tbody>
                {values
                  .filter((v) => v.engineSpecId === s.id)
                  .map((v) => (
                    <tr key={v.id} className="border-t border-stone-200">
                      <td className="px-2 py-1">{SPEC_KEYS[v.key as SpecKey]?.label ?? v.key}</td>
                      <td className="figure px-2 py-1">{fmt(v.minValue)}</td>
                      <td className="figure px-2 py-1">{fmt(v.maxValue)}</td>
                      <td className="figure px-2 py-1">{fmt(v.limitValue)}</td>
                      <td className="figure px-2 py-1">{fmt(v.nominalValue)}</td>
                      <td className="px-2 py-1">{v.unit}</td>
                    </tr>
                  ))}
              </tbody>
            </table>
          </div>
          {manage ? (
            <details className="mt-2">
              <summary className="min-h-11 py-2.5 cursor-pointer font-semibold">Add or change a figure</summary>
              <SpecFigureForm target={{ kind: "library", engineSpecId: s.id }} />
            </details>
          ) : null}
        </section>
      ))}
      <Cautions />
    </div>
  );
}
