"use client";

import { useActionState, useState } from "react";
import { saveClearanceReading } from "@/lib/actions/sheets";
import { initialActionState } from "@/lib/actions/state";
import { CLEARANCE_VERDICT_LABELS, GAUGE_STRIPS, type ClearanceVerdict } from "@/lib/measure/clearance";
import type { ClearanceSheet } from "@/lib/heads/sheets";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-2 text-base";

const TONES: Record<ClearanceVerdict, string> = {
  within_spec: "bg-emerald-100 text-emerald-900",
  tight: "bg-sky-100 text-sky-900",
  loose: "bg-amber-100 text-amber-900",
  beyond_limit: "bg-rose-200 text-rose-900",
};

type Journal = ClearanceSheet["camshafts"][number]["journals"][number];

export function ClearanceRow({ jobId, camshaftLabel, journal, closed }: { jobId: string; camshaftLabel: string; journal: Journal; closed: boolean }) {
  const [state, action, pending] = useActionState(saveClearanceReading, initialActionState);
  const [method, setMethod] = useState<"strip" | "diameters">(journal.reading?.method === "diameters" ? "diameters" : "strip");
  const r = journal.reading;
  const id = `j-${journal.id}`;
  const fe = (k: string) => state.fieldErrors[k]?.[0];
  return (
    <li className="rounded-xl border border-stone-300 bg-white p-3" data-testid="clearance-row" data-journal={journal.position}>
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h3 className="font-semibold">
          {camshaftLabel} · journal <span className="figure">{journal.position}</span>
        </h3>
        {r ? (
          <span className={`rounded-full px-3 py-1 text-sm font-semibold ${r.verdict ? TONES[r.verdict] : "bg-stone-100"}`} data-testid="clearance-verdict">
            <span className="figure">{r.clearanceMm.toFixed(3)} mm</span> · {r.verdict ? CLEARANCE_VERDICT_LABELS[r.verdict] : "no spec"}
          </span>
        ) : (
          <span className="text-sm text-stone-500">Not measured</span>
        )}
      </div>
      {r?.strip && !r.strip.ok ? <p className="mt-1 rounded bg-amber-100 px-2 py-1 text-sm text-amber-900">{r.strip.message}</p> : null}
      {!closed ? (
        <form action={action} className="mt-2 grid grid-cols-2 gap-2 sm:grid-cols-6" noValidate>
          <input type="hidden" name="jobId" value={jobId} />
          <input type="hidden" name="journalId" value={journal.id} />
          <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-2">
            Method
            <select name="method" value={method} onChange={(e) => setMethod(e.target.value as "strip" | "diameters")} className={field}>
              <option value="strip">Gauge strip</option>
              <option value="diameters">Bore − journal</option>
            </select>
          </label>
          {method === "strip" ? (
            <>
              <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-2">
                Strip
                <select name="stripId" defaultValue={r?.stripId ?? "narrow"} className={field}>
                  {GAUGE_STRIPS.map((s) => (
                    <option key={s.id} value={s.id}>
                      {s.label}
                    </option>
                  ))}
                </select>
              </label>
              <label className="flex flex-col text-sm font-semibold">
                Reading
                <input name="value" inputMode="decimal" aria-describedby={`${id}-value`} defaultValue={r?.method === "strip" ? String(r.clearanceMm) : ""} className={`${field} figure`} />
                {fe("value") ? <span id={`${id}-value`} className="text-xs font-normal text-rose-700">{fe("value")}</span> : null}
              </label>
            </>
          ) : (
            <>
              <label className="flex flex-col text-sm font-semibold">
                Bore
                <input name="boreValue" inputMode="decimal" aria-describedby={`${id}-bore`} defaultValue={r?.boreMm ?? ""} className={`${field} figure`} />
                {fe("boreValue") ? <span id={`${id}-bore`} className="text-xs font-normal text-rose-700">{fe("boreValue")}</span> : null}
              </label>
              <label className="flex flex-col text-sm font-semibold">
                Journal
                <input name="journalValue" inputMode="decimal" aria-describedby={`${id}-journal`} defaultValue={r?.journalMm ?? ""} className={`${field} figure`} />
                {fe("journalValue") ? <span id={`${id}-journal`} className="text-xs font-normal text-rose-700">{fe("journalValue")}</span> : null}
              </label>
              <div className="hidden sm:block" />
            </>
          )}
          <label className="flex flex-col text-sm font-semibold">
            Unit
            <select name="unit" defaultValue={r?.enteredUnit ?? "mm"} className={field}>
              <option value="mm">mm</option>
              <option value="in">in</option>
            </select>
          </label>
          <details className="col-span-2 text-sm sm:col-span-6">
            <summary className="min-h-11 py-2.5 cursor-pointer">Specification for this journal (leave blank to use the job&apos;s)</summary>
            <div className="mt-1 grid grid-cols-3 gap-2">
              {(["specMin", "specMax", "specLimit"] as const).map((k) => (
                <label key={k} className="flex flex-col font-semibold">
                  {k === "specMin" ? "Min" : k === "specMax" ? "Max" : "Service limit"}
                  <input name={k} inputMode="decimal" className={`${field} figure`} />
                  {fe(k === "specMin" ? "min" : k === "specMax" ? "max" : "serviceLimit") ? (
                    <span className="text-xs font-normal text-rose-700">{fe(k === "specMin" ? "min" : k === "specMax" ? "max" : "serviceLimit")}</span>
                  ) : null}
                </label>
              ))}
            </div>
          </details>
          <div className="col-span-2 flex flex-wrap items-center gap-2 sm:col-span-6">
            <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white disabled:opacity-60">
              {pending ? "Saving…" : r ? "Update reading" : "Save reading"}
            </button>
            <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`} data-testid="clearance-message">
              {state.message}
            </p>
          </div>
        </form>
      ) : null}
    </li>
  );
}
