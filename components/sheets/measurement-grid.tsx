"use client";

// The whole head's per-seat measurements as one grid, for the bench: type a figure, Tab to the
// next figure of the seat, Enter saves the seat's row and goes to the same figure on the next
// seat. Each row saves on its own; its saved readings and the specification in force are shown
// under each field, apart from what is being typed.
import { useRef, useState, type KeyboardEvent } from "react";
import { saveSeatMeasurements } from "@/lib/actions/sheets";
import type { MeasurementGrid as Grid, SavedMeasurement, SpecInForce } from "@/lib/heads/sheets";
import { MEASUREMENT_KINDS, RANGE_VERDICT_LABELS, STEM_GUIDE_METHODS, type RangeVerdict } from "@/lib/measure/results";
import { FORCE_UNITS, LENGTH_UNITS, UNIT_LABELS } from "@/lib/measure/units";
import { FieldError, fieldClass, ResultMessage, useKeptForm } from "./form-kit";

type Kind = Grid["kinds"][number];
type Seat = Grid["seats"][number];

const SHORT: Record<Kind, string> = {
  seat_contact_width: "Contact width",
  valve_stem_diameter: "Stem Ø",
  stem_guide_clearance: "Stem–guide",
  installed_spring_height: "Spring height",
  spring_load: "Spring load",
};

const VERDICT_CLASS: Record<RangeVerdict, string> = {
  within_spec: "text-emerald-800",
  below: "text-amber-900 font-semibold",
  above: "text-amber-900 font-semibold",
};

const siUnit = (kind: Kind) => (MEASUREMENT_KINDS[kind].quantity === "force" ? "N" : "mm");
const figure = (kind: Kind, v: number) => (MEASUREMENT_KINDS[kind].quantity === "force" ? v.toFixed(0) : v.toFixed(3));

function specText(kind: Kind, s: SpecInForce | undefined): string {
  if (!s) return "no spec on file";
  const u = siUnit(kind);
  if (s.min !== null && s.max !== null) return `spec ${figure(kind, s.min)}–${figure(kind, s.max)} ${u}`;
  if (s.min !== null) return `spec ≥ ${figure(kind, s.min)} ${u}`;
  return `spec ≤ ${figure(kind, s.max!)} ${u}`;
}

function Saved({ kind, m }: { kind: Kind; m: SavedMeasurement | undefined }) {
  return (
    <span className="block text-xs" data-testid={`grid-saved-${kind}`}>
      {m ? (
        <>
          <span className="figure">
            {figure(kind, m.valueSi)} {siUnit(kind)}
          </span>
          {m.verdict ? <span className={VERDICT_CLASS[m.verdict]}> · {RANGE_VERDICT_LABELS[m.verdict]}</span> : null}
          {m.replaced ? <span className="text-stone-600"> · replaces {figure(kind, m.replaced.valueSi)}</span> : null}
        </>
      ) : (
        <span className="text-stone-500">not measured</span>
      )}
    </span>
  );
}

function GridRow({
  jobId,
  seat,
  kinds,
  units,
  stemGuideMethod,
  onEnter,
  register,
}: {
  jobId: string;
  seat: Seat;
  kinds: Kind[];
  units: Record<Kind, string>;
  stemGuideMethod: string;
  onEnter: (seatId: string, kind: Kind) => void;
  register: (seatId: string, kind: Kind, el: HTMLInputElement | null) => void;
}) {
  const { state, pending, onSubmit, onChange, errorFor, showMessage } = useKeptForm(saveSeatMeasurements);
  const [saved, setSaved] = useState(seat.readings);
  const [seen, setSeen] = useState<unknown>(null);
  // The latest save's readings replace the row's, without the page being rendered again.
  if (state.ok && state.saved && state.saved !== seen) {
    setSeen(state.saved);
    setSaved((s) => ({ ...s, ...Object.fromEntries(state.saved!.map((m) => [m.kind, m])) }));
  }
  const formId = `grid-${seat.id}`;
  const keyDown = (kind: Kind) => (e: KeyboardEvent<HTMLInputElement>) => {
    if (e.key !== "Enter") return;
    e.preventDefault();
    (document.getElementById(formId) as HTMLFormElement | null)?.requestSubmit();
    onEnter(seat.id, kind);
  };
  const methodError = errorFor("stemGuideMethod");
  return (
    <>
      <tr className="border-t border-stone-200 align-top" data-testid="grid-row" data-seat={seat.code}>
        <th scope="row" className="sticky left-0 z-10 bg-white px-2 py-2 text-left">
          <form id={formId} onSubmit={onSubmit} noValidate>
            <input type="hidden" name="jobId" value={jobId} />
            <input type="hidden" name="seatId" value={seat.id} />
            <input type="hidden" name="stemGuideMethod" value={stemGuideMethod} />
            {kinds.map((k) => (
              <input key={k} type="hidden" name={`${k}.unit`} value={units[k]} />
            ))}
          </form>
          <span className="figure text-base font-bold">{seat.code}</span>
          {seat.approved ? <span className="block text-xs font-normal text-stone-600">approved</span> : null}
        </th>
        {kinds.map((k) => {
          const err = errorFor(k);
          const label = `${seat.code} ${MEASUREMENT_KINDS[k].label.toLowerCase()}`;
          return (
            <td key={k} className="px-1 py-2">
              <input
                ref={(el) => register(seat.id, k, el)}
                form={formId}
                name={k}
                data-kind={k}
                inputMode="decimal"
                enterKeyHint="next"
                autoComplete="off"
                disabled={seat.approved}
                aria-label={label}
                aria-invalid={err ? true : undefined}
                aria-describedby={`${formId}-${k}-spec${err ? ` ${formId}-${k}-err` : ""}`}
                onChange={onChange}
                onKeyDown={keyDown(k)}
                className={fieldClass(Boolean(err), "figure w-24")}
              />
              <FieldError id={`${formId}-${k}-err`} message={err} />
              {k === "stem_guide_clearance" && methodError ? <FieldError id={`${formId}-method-err`} message={methodError} /> : null}
              <Saved kind={k} m={saved[k]} />
              <span id={`${formId}-${k}-spec`} className="figure block text-xs text-stone-600" data-testid={`grid-spec-${k}`}>
                {specText(k, seat.specs[k])}
              </span>
            </td>
          );
        })}
        <td className="px-1 py-2">
          <button
            type="submit"
            form={formId}
            disabled={pending || seat.approved}
            aria-label={`Save ${seat.code}`}
            className="min-h-11 min-w-11 rounded-lg bg-ink px-3 font-semibold text-white disabled:opacity-60"
          >
            {pending ? "…" : "Save"}
          </button>
        </td>
      </tr>
      {showMessage ? (
        <tr>
          <td colSpan={kinds.length + 2} className="px-2 pb-2">
            <ResultMessage state={state} testId="grid-message" />
          </td>
        </tr>
      ) : null}
    </>
  );
}

export function MeasurementGrid({ jobId, grid }: { jobId: string; grid: Grid }) {
  const kinds = grid.kinds;
  const [units, setUnits] = useState<Record<Kind, string>>(
    () => Object.fromEntries(kinds.map((k) => [k, MEASUREMENT_KINDS[k].defaultUnit])) as Record<Kind, string>,
  );
  const [method, setMethod] = useState("");
  const inputs = useRef(new Map<string, HTMLInputElement>());
  const register = (seatId: string, kind: Kind, el: HTMLInputElement | null) => {
    if (el) inputs.current.set(`${seatId}|${kind}`, el);
    else inputs.current.delete(`${seatId}|${kind}`);
  };
  // Enter goes to the same figure on the next seat that can still be measured.
  const onEnter = (seatId: string, kind: Kind) => {
    const i = grid.seats.findIndex((s) => s.id === seatId);
    const next = grid.seats.slice(i + 1).find((s) => !s.approved);
    if (next) inputs.current.get(`${next.id}|${kind}`)?.focus();
  };
  const noSpec = kinds.filter((k) => grid.seats.some((s) => !s.specs[k]));
  return (
    <div className="flex flex-col gap-2" data-testid="measurement-grid">
      <p className="text-sm text-stone-700">
        Type a figure, <kbd className="figure">Tab</kbd> to the next one of the seat, <kbd className="figure">Enter</kbd> saves the seat and goes to
        the next seat. A figure typed again for a seat replaces the one saved (the audit trail keeps both).
      </p>
      <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white">
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Measurements per seat</caption>
          <thead className="bg-stone-100 align-top">
            <tr>
              <th scope="col" className="sticky left-0 z-10 bg-stone-100 px-2 py-2">
                Seat
              </th>
              {kinds.map((k) => {
                const info = MEASUREMENT_KINDS[k];
                const options = info.quantity === "force" ? FORCE_UNITS : LENGTH_UNITS;
                return (
                  <th key={k} scope="col" className="px-1 py-2 font-semibold">
                    <span className="block">{SHORT[k]}</span>
                    <label className="mt-1 flex flex-col text-xs font-normal">
                      <span className="sr-only">Unit of {info.label.toLowerCase()}</span>
                      <select
                        value={units[k]}
                        onChange={(e) => setUnits((u) => ({ ...u, [k]: e.target.value }))}
                        className="min-h-11 rounded border border-stone-400 bg-white px-1"
                        data-testid={`grid-unit-${k}`}
                      >
                        {options.map((u) => (
                          <option key={u} value={u}>
                            {UNIT_LABELS[u]}
                          </option>
                        ))}
                      </select>
                    </label>
                    {k === "stem_guide_clearance" ? (
                      <label className="mt-1 flex flex-col text-xs font-normal">
                        <span className="sr-only">How the stem-to-guide clearance was measured</span>
                        <select
                          value={method}
                          onChange={(e) => setMethod(e.target.value)}
                          className="min-h-11 rounded border border-stone-400 bg-white px-1"
                          data-testid="grid-stem-method"
                        >
                          <option value="">Method…</option>
                          {STEM_GUIDE_METHODS.map((m) => (
                            <option key={m} value={m}>
                              {m === "direct" ? "Direct" : "Rocking"}
                            </option>
                          ))}
                        </select>
                      </label>
                    ) : null}
                  </th>
                );
              })}
              <th scope="col" className="px-1 py-2">
                <span className="sr-only">Save</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {grid.seats.map((s) => (
              <GridRow key={s.id} jobId={jobId} seat={s} kinds={kinds} units={units} stemGuideMethod={method} onEnter={onEnter} register={register} />
            ))}
          </tbody>
        </table>
      </div>
      {noSpec.length ? (
        <p className="text-sm text-stone-700" data-testid="grid-no-spec">
          No specification on file for {noSpec.map((k) => MEASUREMENT_KINDS[k].label.toLowerCase()).join(", ")} on some seats: those figures are saved
          but not judged. Use the engine maker&apos;s figure (add it to the job&apos;s specification); typical figures from service manuals are only a
          guide.
        </p>
      ) : null}
      <p className="text-sm text-stone-700">
        Stem-to-guide: the rocking method (dial indicator on the rocked valve) reads larger than guide bore minus stem, so it is judged against a
        rocking figure.
      </p>
    </div>
  );
}
