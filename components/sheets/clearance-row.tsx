"use client";

import { useState } from "react";
import { saveClearanceReading } from "@/lib/actions/sheets";
import { CLEARANCE_VERDICT_LABELS, GAUGE_STRIPS, type ClearanceVerdict } from "@/lib/measure/clearance";
import type { ClearanceReadingView, ClearanceSheet } from "@/lib/heads/sheets";
import { formatWhen } from "@/lib/dates";
import { useShopTimeZone } from "@/components/shop-time-zone";
import { DecimalField, FieldError, fieldClass, ResultMessage, useKeptForm } from "./form-kit";

const TONES: Record<ClearanceVerdict, string> = {
  within_spec: "bg-emerald-100 text-emerald-900",
  tight: "bg-sky-100 text-sky-900",
  loose: "bg-amber-100 text-amber-900",
  beyond_limit: "bg-rose-200 text-rose-900",
};

type Journal = ClearanceSheet["camshafts"][number]["journals"][number];

/** The saved reading, shown apart from the fields being typed in. */
function SavedReading({ r, timeZone }: { r: ClearanceReadingView | null; timeZone: string }) {
  if (!r) return <span className="text-sm text-stone-500" data-testid="clearance-saved">Not measured</span>;
  const how = r.method === "diameters" ? "bore − journal" : r.stripId === "wide" ? "wide strip" : "narrow strip";
  return (
    <span className="flex flex-col items-end gap-0.5" data-testid="clearance-saved">
      {r.offScale ? (
        <span className="rounded-full bg-amber-200 px-3 py-1 text-sm font-semibold text-amber-950" data-testid="clearance-verdict">
          Off scale ({how}) · no clearance
        </span>
      ) : (
        <span className={`rounded-full px-3 py-1 text-sm font-semibold ${r.verdict ? TONES[r.verdict] : "bg-stone-100"}`} data-testid="clearance-verdict">
          <span className="figure">{r.clearanceMm.toFixed(3)} mm</span> · {r.verdict ? CLEARANCE_VERDICT_LABELS[r.verdict] : "no spec"}
        </span>
      )}
      <span className="text-xs text-stone-600">
        Saved {how} · {formatWhen(r.recordedAt, timeZone)}
      </span>
    </span>
  );
}

export function ClearanceRow({
  jobId,
  camshaftLabel,
  journal,
  closed,
  spec,
}: {
  jobId: string;
  camshaftLabel: string;
  journal: Journal;
  closed: boolean;
  /** The specification in force for the job, shown beside the reading. */
  spec: ClearanceSheet["spec"];
}) {
  const timeZone = useShopTimeZone();
  const { state, pending, onSubmit, onChange, errorFor, showMessage } = useKeptForm(saveClearanceReading);
  // The reading as saved: the latest save's answer, else the sheet's as the page was opened.
  const r = state.ok && state.saved ? state.saved : journal.reading;
  const [method, setMethod] = useState<"strip" | "diameters">(journal.reading?.method === "diameters" ? "diameters" : "strip");
  const id = `j-${journal.id}`;
  const input = (name: string, label: string, key: string, defaultValue: string, hint?: string) => (
    <DecimalField idBase={id} name={name} label={label} error={errorFor(key, name)} defaultValue={defaultValue} hint={hint} />
  );
  const saved = journal.reading;
  const specHint =
    spec && spec.min !== null && spec.max !== null
      ? `Spec in force ${spec.min.toFixed(3)}–${spec.max.toFixed(3)} mm${spec.limit !== null ? `, limit ${spec.limit.toFixed(3)}` : ""}`
      : "No spec on file: enter it below";
  return (
    <li className="rounded-xl border border-stone-300 bg-white p-3" data-testid="clearance-row" data-journal={journal.position}>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <h3 className="font-semibold">
          {camshaftLabel} · journal <span className="figure">{journal.position}</span>
        </h3>
        <SavedReading r={r} timeZone={timeZone} />
      </div>
      {r?.offScale && r.strip && !r.strip.ok ? (
        <p className="mt-1 rounded bg-amber-100 px-2 py-1 text-sm text-amber-950" data-testid="clearance-advice">
          {r.strip.message}
        </p>
      ) : null}
      {!closed ? (
        <form onSubmit={onSubmit} onChange={onChange} className="mt-2 grid grid-cols-2 gap-2 sm:grid-cols-6" noValidate>
          <input type="hidden" name="jobId" value={jobId} />
          <input type="hidden" name="journalId" value={journal.id} />
          <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-2">
            Method
            <select name="method" value={method} onChange={(e) => setMethod(e.target.value as "strip" | "diameters")} className={fieldClass(false)}>
              <option value="strip">Gauge strip</option>
              <option value="diameters">Bore − journal</option>
            </select>
          </label>
          {method === "strip" ? (
            <>
              <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-2">
                Strip
                <select name="stripId" defaultValue={saved?.stripId ?? "narrow"} className={fieldClass(Boolean(errorFor("stripId")))}>
                  {GAUGE_STRIPS.map((s) => (
                    <option key={s.id} value={s.id}>
                      {s.label}
                    </option>
                  ))}
                </select>
                <FieldError id={`${id}-stripId-err`} message={errorFor("stripId")} />
              </label>
              {input("value", "Reading", "value", saved?.method === "strip" ? String(saved.clearanceMm) : "", specHint)}
            </>
          ) : (
            <>
              {input("boreValue", "Bore", "boreValue", saved?.boreMm != null ? String(saved.boreMm) : "", specHint)}
              {input("journalValue", "Journal", "journalValue", saved?.journalMm != null ? String(saved.journalMm) : "")}
              <div className="hidden sm:block" />
            </>
          )}
          <label className="flex flex-col text-sm font-semibold">
            Unit
            <select name="unit" defaultValue={saved?.enteredUnit ?? "mm"} className={fieldClass(Boolean(errorFor("unit")))}>
              <option value="mm">mm</option>
              <option value="in">in</option>
            </select>
            <FieldError id={`${id}-unit-err`} message={errorFor("unit")} />
          </label>
          <details className="col-span-2 text-sm sm:col-span-6" open={Boolean(errorFor("min") || errorFor("max") || errorFor("serviceLimit"))}>
            <summary className="min-h-11 py-2.5 cursor-pointer">Specification for this journal (leave blank to use the job&apos;s)</summary>
            <div className="mt-1 grid grid-cols-3 gap-2">
              {input("specMin", "Min", "min", "")}
              {input("specMax", "Max", "max", "")}
              {input("specLimit", "Service limit", "serviceLimit", "")}
            </div>
          </details>
          <div className="col-span-2 flex flex-wrap items-center gap-2 sm:col-span-6">
            <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white disabled:opacity-60">
              {pending ? "Saving…" : r ? "Update reading" : "Save reading"}
            </button>
            <ResultMessage state={state} show={showMessage} testId="clearance-message" />
          </div>
        </form>
      ) : null}
    </li>
  );
}
