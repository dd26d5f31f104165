"use client";

// What every sheet form shares: it keeps what was typed (a refusal never clears a field), marks
// each refused field with its own message until that field is changed, and shows the answer in
// the colour of what it says.
import { startTransition, useActionState, useState, type FormEvent } from "react";
import { initialActionState, toneOf, type ActionState, type ResultTone } from "@/lib/actions/state";

export const fieldBase = "min-h-12 rounded-lg border bg-white px-2 text-base";

/** A field's classes: a red, thicker border while it holds a refused value. */
export const fieldClass = (invalid: boolean, extra = "") =>
  `${fieldBase} ${invalid ? "border-2 border-rose-600 bg-rose-50" : "border-stone-400"} ${extra}`.trim();

const snapshot = (form: HTMLFormElement): Record<string, string> => {
  const out: Record<string, string> = {};
  for (const [k, v] of new FormData(form)) if (typeof v === "string") out[k] = v;
  return out;
};

/**
 * A form bound to a server action that is sent without the browser's form reset, so every field
 * keeps its value and every choice (method, seat, unit) stays after a save or a refusal.
 * `errorFor(key, name)` answers a field's refusal only while the field still holds the value
 * that was refused; `message` drops a refusal once none of its fields applies any more.
 */
export function useKeptForm<T>(action: (prev: ActionState<T>, f: FormData) => Promise<ActionState<T>>) {
  const [state, dispatch, pending] = useActionState(action, initialActionState as ActionState<T>);
  const [sent, setSent] = useState<Record<string, string>>({});
  const [now, setNow] = useState<Record<string, string>>({});
  const onSubmit = (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const form = e.currentTarget;
    const values = snapshot(form);
    setSent(values);
    setNow(values);
    const data = new FormData(form);
    startTransition(() => dispatch(data));
  };
  /** Tracks edits, so that a refusal goes once the refused value is changed. */
  const onChange = (e: { target: EventTarget | null }) => {
    const t = e.target as HTMLInputElement;
    if (t.name) setNow((n) => ({ ...n, [t.name]: t.value }));
  };
  const unchanged = (name: string) => now[name] === sent[name];
  const errorFor = (key: string, name = nameOf(key)): string | undefined => (unchanged(name) ? state.fieldErrors[key]?.[0] : undefined);
  const refusedKeys = Object.keys(state.fieldErrors);
  // A refusal with field errors applies while one of them does; one without (a conflict) until the form is changed.
  const stillApplies = state.ok
    ? true
    : refusedKeys.length
      ? refusedKeys.some((k) => unchanged(nameOf(k)))
      : Object.keys(sent).every((k) => unchanged(k));
  return { state, pending, onSubmit, onChange, errorFor, showMessage: Boolean(state.message) && stillApplies };
}

// Field error keys are zod paths ("spec.min", "finalTorque.value"); inputs are named flat.
const KEY_TO_NAME: Record<string, string> = {
  "spec.min": "specMin",
  "spec.max": "specMax",
  min: "specMin",
  max: "specMax",
  serviceLimit: "specLimit",
  "finalTorque.value": "finalTorque",
};
const nameOf = (key: string) => KEY_TO_NAME[key] ?? key;

const TONE_CLASS: Record<ResultTone, string> = {
  ok: "border-emerald-600 bg-emerald-50 text-emerald-900",
  warn: "border-amber-500 bg-amber-50 text-amber-950",
  refused: "border-rose-600 bg-rose-50 text-rose-900",
};

/** The answer to a save, in the colour of what it says: green saved, amber saved but worth a look, red refused. */
export function ResultMessage({ state, show = true, testId }: { state: ActionState<unknown>; show?: boolean; testId?: string }) {
  const tone = toneOf(state);
  const visible = show && Boolean(state.message);
  return (
    <p
      aria-live="polite"
      data-tone={visible ? tone : undefined}
      data-testid={testId}
      className={visible ? `rounded-lg border-l-4 px-2 py-1 text-sm ${TONE_CLASS[tone]}` : "text-sm"}
    >
      {visible ? state.message : null}
    </p>
  );
}

/** A field's own refusal, tied to it by id for screen readers. */
export function FieldError({ id, message }: { id: string; message: string | undefined }) {
  return message ? (
    <span id={id} className="text-xs font-semibold text-rose-700">
      {message}
    </span>
  ) : null;
}

/**
 * A decimal figure with its label, an optional hint, and its own refusal: marked invalid, red,
 * and described by the refusal while there is one, by the hint otherwise. `idBase` keeps the ids
 * of one form's fields apart from another's.
 */
export function DecimalField({ idBase, name, label, error, defaultValue, hint }: { idBase: string; name: string; label: string; error: string | undefined; defaultValue?: string; hint?: string }) {
  return (
    <label className="flex flex-col text-sm font-semibold">
      {label}
      <input
        name={name}
        inputMode="decimal"
        autoComplete="off"
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${idBase}-${name}-err` : hint ? `${idBase}-${name}-hint` : undefined}
        defaultValue={defaultValue}
        className={fieldClass(Boolean(error), "figure")}
      />
      {hint && !error ? (
        <span id={`${idBase}-${name}-hint`} className="text-xs font-normal text-stone-600">
          {hint}
        </span>
      ) : null}
      <FieldError id={`${idBase}-${name}-err`} message={error} />
    </label>
  );
}
