"use client";

import { useActionState, useState } from "react";
import { saveTick, saveTorqueSetup } from "@/lib/actions/sheets";
import { initialActionState } from "@/lib/actions/state";
import type { TorqueSheetView } from "@/lib/heads/sheets";
import { formatTorque, TORQUE_UNITS } from "@/lib/measure/units";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-2 text-base";

function TorqueFigures({ nm }: { nm: number }) {
  const t = formatTorque(nm);
  return (
    <span className="figure">
      {t.nm.toFixed(1)} N·m · {t.lbfFt.toFixed(1)} lbf·ft · {t.kgfM.toFixed(2)} kgf·m
    </span>
  );
}

export function TorqueSetupForm({
  jobId,
  camshaftId,
  journalCount,
  specNm,
  closed,
}: {
  jobId: string;
  camshaftId: string;
  journalCount: number;
  specNm: number | null;
  closed: boolean;
}) {
  const [state, action, pending] = useActionState(saveTorqueSetup, initialActionState);
  const [mode, setMode] = useState<"centre-out" | "maker">("centre-out");
  const fe = (k: string) => state.fieldErrors[k]?.[0];
  if (closed) return <p className="text-sm text-stone-600">No torque sheet was set up before sign-off.</p>;
  return (
    <form action={action} className="grid grid-cols-2 gap-2 sm:grid-cols-4" data-testid="torque-setup" noValidate>
      <input type="hidden" name="jobId" value={jobId} />
      <input type="hidden" name="camshaftId" value={camshaftId} />
      <label className="flex flex-col text-sm font-semibold">
        Caps
        <input name="capCount" inputMode="numeric" defaultValue={journalCount} className={`${field} figure`} />
        {fe("capCount") ? <span className="text-xs font-normal text-rose-700">{fe("capCount")}</span> : null}
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Bolts per cap
        <select name="boltsPerCap" defaultValue="2" className={field}>
          <option value="1">1</option>
          <option value="2">2 (one each side)</option>
        </select>
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Final torque
        <input name="finalTorque" inputMode="decimal" defaultValue={specNm ?? ""} className={`${field} figure`} />
        {fe("finalTorque.value") ? <span className="text-xs font-normal text-rose-700">{fe("finalTorque.value")}</span> : null}
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Unit
        <select name="finalTorqueUnit" defaultValue="N·m" className={field}>
          {TORQUE_UNITS.map((u) => (
            <option key={u} value={u}>
              {u}
            </option>
          ))}
        </select>
      </label>
      <label className="col-span-2 flex flex-col text-sm font-semibold">
        Order
        <select name="orderMode" value={mode} onChange={(e) => setMode(e.target.value as "centre-out" | "maker")} className={field}>
          <option value="centre-out">Suggested: centre outwards</option>
          <option value="maker">From the engine maker&apos;s figure</option>
        </select>
      </label>
      <label className="col-span-2 flex flex-col text-sm font-semibold">
        Stages (share of final)
        <input name="stageFractions" defaultValue="0.3, 0.6, 1" className={`${field} figure`} />
        {fe("stageFractions") ? <span className="text-xs font-normal text-rose-700">{fe("stageFractions")}</span> : null}
      </label>
      {mode === "maker" ? (
        <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-4">
          Bolts in the maker&apos;s order (e.g. C3-L, C3-R, C2-R, …)
          <input name="order" className={`${field} figure`} />
          {fe("order") ? <span className="text-xs font-normal text-rose-700">{fe("order")}</span> : null}
        </label>
      ) : null}
      <div className="col-span-2 flex flex-wrap items-center gap-2 sm:col-span-4">
        <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white disabled:opacity-60">
          {pending ? "Setting up…" : "Set up the sheet"}
        </button>
        <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}>
          {state.message}
        </p>
      </div>
    </form>
  );
}

function TickButton({ jobId, sheetId, stage, boltId, expected }: { jobId: string; sheetId: string; stage: number; boltId: string; expected: boolean }) {
  const [state, action, pending] = useActionState(saveTick, initialActionState);
  return (
    <form action={action} className="contents">
      <input type="hidden" name="jobId" value={jobId} />
      <input type="hidden" name="sheetId" value={sheetId} />
      <input type="hidden" name="stage" value={stage} />
      <input type="hidden" name="boltId" value={boltId} />
      <button
        type="submit"
        disabled={pending}
        aria-label={`Tick ${boltId} at stage ${stage}`}
        className={`figure min-h-12 min-w-16 rounded-lg border-2 px-2 font-bold ${expected ? "border-ink bg-amber-300" : "border-stone-300 bg-white"}`}
        data-testid={`tick-${stage}-${boltId}`}
      >
        {boltId}
      </button>
      {state.message && !state.ok ? (
        <span role="alert" className="col-span-full rounded bg-rose-100 px-2 py-1 text-sm text-rose-900" data-testid="tick-refusal">
          {state.message}
        </span>
      ) : null}
    </form>
  );
}

export function TorqueTickList({ jobId, sheet, closed }: { jobId: string; sheet: TorqueSheetView; closed: boolean }) {
  const done = new Set(sheet.ticks.map((t) => `${t.stage}|${t.boltId}`));
  return (
    <div className="flex flex-col gap-3" data-testid="torque-sheet">
      <p className="text-sm text-stone-700">
        Order: {sheet.orderSource === "centre-out" ? "centre outwards (suggested)" : "engine maker's figure"} · final{" "}
        <TorqueFigures nm={sheet.finalNm} />
        {sheet.specSource !== "entered" ? " · from the specification" : ""}
      </p>
      {sheet.stages.map((st) => (
        <section key={st.stage} aria-label={`Stage ${st.stage}`} className="rounded-lg border border-stone-200 p-2">
          <h4 className="mb-2 text-sm font-semibold">
            Stage {st.stage}: {st.label} — <TorqueFigures nm={st.nm} />
          </h4>
          <div className="grid grid-cols-3 gap-2 sm:grid-cols-6">
            {sheet.order.map((boltId, k) =>
              done.has(`${st.stage}|${boltId}`) ? (
                <span key={boltId} className="figure flex min-h-12 items-center justify-center rounded-lg bg-emerald-600 font-bold text-white" data-testid={`done-${st.stage}-${boltId}`}>
                  <span className="sr-only">Done: </span>
                  {k + 1}. {boltId} ✓
                </span>
              ) : closed ? (
                <span key={boltId} className="figure flex min-h-12 items-center justify-center rounded-lg bg-stone-100">
                  {boltId}
                </span>
              ) : (
                <TickButton
                  key={boltId}
                  jobId={jobId}
                  sheetId={sheet.id}
                  stage={st.stage}
                  boltId={boltId}
                  expected={sheet.next?.stage === st.stage && sheet.next.boltId === boltId}
                />
              ),
            )}
          </div>
        </section>
      ))}
      <p aria-live="polite" className="font-semibold" data-testid="torque-next">
        {sheet.next ? `Next: ${sheet.next.boltId} at stage ${sheet.next.stage}.` : "Complete: every bolt at every stage."}
      </p>
    </div>
  );
}
