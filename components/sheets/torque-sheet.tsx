"use client";

import { useActionState, useState } from "react";
import { FieldError, fieldClass, ResultMessage, useKeptForm } from "./form-kit";
import { saveTick, saveTorqueSetup, undoLastTick } from "@/lib/actions/sheets";
import { initialActionState, type ActionState } from "@/lib/actions/state";
import type { TorqueSheetView } from "@/lib/heads/sheets";
import { confirmationFigure, deviationMessage, deviationNeedsConfirmation, type Tick } from "@/lib/measure/torque";
import {
  convertTorqueList,
  convertTorqueText,
  formatTorque,
  roundTo,
  toNm,
  TORQUE_UNITS,
  type TorqueUnit,
} from "@/lib/measure/units";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-2 text-base";

function TorqueFigures({ nm }: { nm: number }) {
  const t = formatTorque(nm);
  return (
    <span className="figure">
      {t.nm.toFixed(1)} N·m · {t.lbfFt.toFixed(1)} lbf·ft · {t.kgfM.toFixed(2)} kgf·m
    </span>
  );
}

/** A sheet's set-up as the form starts from: the camshaft's own caps, or the sheet being changed. */
export interface TorqueSetupStart {
  capCount: number;
  boltsPerCap: number;
  finalNm: number | null;
  stageFractions: readonly number[];
  order: readonly string[] | null;
}

const errorText = "text-xs font-normal text-rose-700";

function typedNm(text: string, unit: TorqueUnit): number | null {
  const t = text.trim();
  if (!/^[+]?(\d+([.,]\d*)?|[.,]\d+)$/.test(t)) return null;
  const v = Number(t.replace(",", "."));
  return v > 0 ? toNm(v, unit) : null;
}

/** A form's submit button with the answer beside it, in the colour of what it says. */
function SubmitRow({
  className = "",
  buttonClass,
  label,
  pending,
  state,
  show = true,
}: {
  className?: string;
  buttonClass: string;
  label: string;
  pending: boolean;
  state: ActionState<unknown>;
  show?: boolean;
}) {
  return (
    <div className={`flex flex-wrap items-center gap-2 ${className}`}>
      <button type="submit" disabled={pending} className={`min-h-12 rounded-lg font-semibold disabled:opacity-60 ${buttonClass}`}>
        {label}
      </button>
      <ResultMessage state={state} show={show} />
    </div>
  );
}

/** A torque typed as text, kept in the form's state so that a change of unit can convert it. */
function TypedTorque({
  label,
  name,
  value,
  onChange,
  error,
  wide = false,
}: {
  label: string;
  name: string;
  value: string;
  onChange: (text: string) => void;
  error: string | undefined;
  wide?: boolean;
}) {
  return (
    <label className={`flex flex-col text-sm font-semibold ${wide ? "col-span-2 sm:col-span-4" : ""}`}>
      {label}
      <input
        name={name}
        inputMode="decimal"
        value={value}
        onChange={(e) => onChange(e.target.value)}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${name}-err` : undefined}
        className={fieldClass(Boolean(error), "figure")}
        data-testid={name}
      />
      <FieldError id={`${name}-err`} message={error} />
    </label>
  );
}

export function TorqueSetupForm({
  jobId,
  camshaftId,
  start,
  specNm,
  closed,
}: {
  jobId: string;
  camshaftId: string;
  start: TorqueSetupStart;
  specNm: number | null;
  closed: boolean;
}) {
  const { state, pending, onSubmit, onChange, errorFor, showMessage } = useKeptForm(saveTorqueSetup);
  const [mode, setMode] = useState<"centre-out" | "maker">(start.order ? "maker" : "centre-out");
  const [stageMode, setStageMode] = useState<"fractions" | "torques">("fractions");
  const startNm = start.finalNm ?? specNm;
  const [unit, setUnit] = useState<TorqueUnit>("N·m");
  const [finalText, setFinalText] = useState(startNm === null ? "" : String(roundTo(startNm, 2)));
  const [stageTorques, setStageTorques] = useState(
    startNm === null ? "" : start.stageFractions.slice(0, -1).map((f) => String(roundTo(f * startNm, 2))).join(", "),
  );
  const fe = (k: string) => errorFor(k);
  if (closed) return <p className="text-sm text-stone-600">No torque sheet was set up before sign-off.</p>;
  // The unit names the torque already typed: changing it converts the figure, never reinterprets it.
  const changeUnit = (next: TorqueUnit) => {
    setFinalText((t) => convertTorqueText(t, unit, next));
    setStageTorques((t) => convertTorqueList(t, unit, next));
    setUnit(next);
  };
  const finalNm = typedNm(finalText, unit);
  const needsConfirmation = finalNm !== null && deviationNeedsConfirmation(finalNm, specNm);
  return (
    <form onSubmit={onSubmit} onChange={onChange} className="grid grid-cols-2 gap-2 sm:grid-cols-4" data-testid="torque-setup" noValidate>
      <input type="hidden" name="jobId" value={jobId} />
      <input type="hidden" name="camshaftId" value={camshaftId} />
      <label className="flex flex-col text-sm font-semibold">
        Caps
        <input
          name="capCount"
          inputMode="numeric"
          defaultValue={start.capCount}
          aria-invalid={fe("capCount") ? true : undefined}
          aria-describedby={fe("capCount") ? `${camshaftId}-capCount-err` : undefined}
          className={fieldClass(Boolean(fe("capCount")), "figure")}
        />
        <FieldError id={`${camshaftId}-capCount-err`} message={fe("capCount")} />
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Bolts per cap
        <select name="boltsPerCap" defaultValue={String(start.boltsPerCap)} className={field}>
          <option value="1">1</option>
          <option value="2">2 (one each side)</option>
        </select>
      </label>
      <TypedTorque label="Final torque" name="finalTorque" value={finalText} onChange={setFinalText} error={fe("finalTorque.value")} />
      <label className="flex flex-col text-sm font-semibold">
        Unit
        <select
          name="finalTorqueUnit"
          value={unit}
          onChange={(e) => changeUnit(e.target.value as TorqueUnit)}
          className={field}
          data-testid="final-torque-unit"
        >
          {TORQUE_UNITS.map((u) => (
            <option key={u} value={u}>
              {u}
            </option>
          ))}
        </select>
      </label>
      <p className="col-span-2 text-sm text-stone-700 sm:col-span-4" data-testid="final-torque-nm">
        {finalNm !== null ? (
          <>
            Final: <TorqueFigures nm={finalNm} />
          </>
        ) : (
          "Enter the final torque."
        )}
        {specNm !== null ? (
          <>
            {" "}
            · specification: <TorqueFigures nm={specNm} />
          </>
        ) : null}
      </p>
      {needsConfirmation || fe("confirmDeviation") ? (
        <div className="col-span-2 rounded-lg border-2 border-rose-600 bg-rose-50 p-2 text-sm sm:col-span-4" role="alert">
          {finalNm !== null && specNm !== null && needsConfirmation ? (
            <label className="flex items-start gap-2 font-semibold">
              <input
                type="checkbox"
                name="confirmDeviation"
                value={confirmationFigure(finalNm)}
                className="mt-1 size-6"
                data-testid="confirm-deviation"
              />
              <span>
                {deviationMessage(finalNm, specNm)} I confirm {confirmationFigure(finalNm)} N·m, not the specification&apos;s{" "}
                {confirmationFigure(specNm)} N·m.
              </span>
            </label>
          ) : null}
          {fe("confirmDeviation") ? <p className="mt-1 text-rose-800">{fe("confirmDeviation")}</p> : null}
        </div>
      ) : null}
      <label className="col-span-2 flex flex-col text-sm font-semibold">
        Order
        <select name="orderMode" value={mode} onChange={(e) => setMode(e.target.value as "centre-out" | "maker")} className={field}>
          <option value="centre-out">Suggested: centre outwards</option>
          <option value="maker">From the engine maker&apos;s figure</option>
        </select>
      </label>
      <label className="col-span-2 flex flex-col text-sm font-semibold">
        Stages given as
        <select
          name="stageMode"
          value={stageMode}
          onChange={(e) => setStageMode(e.target.value as "fractions" | "torques")}
          className={field}
          data-testid="stage-mode"
        >
          <option value="fractions">Shares of the final torque</option>
          <option value="torques">Torques, as the maker prints them</option>
        </select>
      </label>
      {stageMode === "fractions" ? (
        <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-4">
          Stages (share of final)
          <input
            name="stageFractions"
            defaultValue={start.stageFractions.map((f) => roundTo(f, 3)).join(", ")}
            aria-invalid={fe("stageFractions") ? true : undefined}
            className={fieldClass(Boolean(fe("stageFractions")), "figure")}
          />
          <FieldError id={`${camshaftId}-stageFractions-err`} message={fe("stageFractions")} />
        </label>
      ) : (
        <TypedTorque
          label={`Stages before the final, in ${unit} (e.g. 4, 7 for a final of 10)`}
          name="stageTorques"
          value={stageTorques}
          onChange={setStageTorques}
          error={fe("stageTorques")}
          wide
        />
      )}
      {mode === "maker" ? (
        <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-4">
          Bolts in the maker&apos;s order (e.g. C3-L, C3-R, C2-R, …)
          <input
            name="order"
            defaultValue={start.order?.join(", ") ?? ""}
            aria-invalid={fe("order") ? true : undefined}
            className={fieldClass(Boolean(fe("order")), "figure")}
          />
          <FieldError id={`${camshaftId}-order-err`} message={fe("order")} />
        </label>
      ) : null}
      <SubmitRow
        className="col-span-2 sm:col-span-4"
        buttonClass="bg-ink px-5 text-white"
        label={pending ? "Setting up…" : start.finalNm === null ? "Set up the sheet" : "Change the set-up"}
        pending={pending}
        state={state}
        show={showMessage}
      />
    </form>
  );
}

function UndoTickForm({ jobId, sheetId, tick }: { jobId: string; sheetId: string; tick: Tick }) {
  const { state, pending, onSubmit, onChange, errorFor, showMessage } = useKeptForm(undoLastTick);
  return (
    <details className="rounded-lg border border-stone-300 p-2" data-testid="undo-tick">
      <summary className="min-h-12 cursor-pointer content-center text-sm font-semibold">
        Undo the last tick ({tick.boltId} at stage {tick.stage})
      </summary>
      <form onSubmit={onSubmit} onChange={onChange} className="mt-2 flex flex-col gap-2" noValidate>
        <input type="hidden" name="jobId" value={jobId} />
        <input type="hidden" name="sheetId" value={sheetId} />
        <input type="hidden" name="stage" value={tick.stage} />
        <input type="hidden" name="boltId" value={tick.boltId} />
        <label className="flex flex-col text-sm font-semibold">
          Why (kept in the audit trail)
          <input
            name="reason"
            maxLength={300}
            aria-invalid={errorFor("reason") ? true : undefined}
            aria-describedby={errorFor("reason") ? `${sheetId}-reason-err` : undefined}
            className={fieldClass(Boolean(errorFor("reason")))}
          />
          <FieldError id={`${sheetId}-reason-err`} message={errorFor("reason")} />
        </label>
        <SubmitRow buttonClass="border-2 border-ink bg-white px-4" label={pending ? "Undoing…" : "Undo the tick"} pending={pending} state={state} show={showMessage} />
      </form>
    </details>
  );
}

function TickButton({
  jobId,
  sheetId,
  stage,
  boltId,
  position,
  expected,
}: {
  jobId: string;
  sheetId: string;
  stage: number;
  boltId: string;
  position: number;
  expected: boolean;
}) {
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
        {position}. {boltId}
      </button>
      {state.message && !state.ok ? (
        <span role="alert" className="col-span-full rounded bg-rose-100 px-2 py-1 text-sm text-rose-900" data-testid="tick-refusal">
          {state.message}
        </span>
      ) : null}
    </form>
  );
}

export function TorqueTickList({
  jobId,
  sheet,
  specNm,
  closed,
}: {
  jobId: string;
  sheet: TorqueSheetView;
  specNm: number | null;
  closed: boolean;
}) {
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
                  {k + 1}. {boltId}
                </span>
              ) : (
                <TickButton
                  key={boltId}
                  jobId={jobId}
                  sheetId={sheet.id}
                  stage={st.stage}
                  boltId={boltId}
                  position={k + 1}
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
      {!closed && sheet.last ? <UndoTickForm jobId={jobId} sheetId={sheet.id} tick={sheet.last} /> : null}
      {!closed && !sheet.last ? (
        // The set-up stays open until the first bolt is ticked.
        <details className="rounded-lg border border-stone-300 p-2" data-testid="change-setup">
          <summary className="min-h-12 cursor-pointer content-center text-sm font-semibold">Change the set-up (no bolt is ticked yet)</summary>
          <TorqueSetupForm
            jobId={jobId}
            camshaftId={sheet.camshaftId}
            start={{
              capCount: sheet.capCount,
              boltsPerCap: sheet.boltsPerCap,
              finalNm: sheet.finalNm,
              stageFractions: sheet.stages.map((st) => st.fraction),
              order: sheet.orderSource === "maker" ? sheet.order : null,
            }}
            specNm={specNm}
            closed={closed}
          />
        </details>
      ) : null}
    </div>
  );
}
