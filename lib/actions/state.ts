// The shape every server action returns to its form.
import { ZodError } from "zod";
import { AppError, BadRequestError, currentRequestId, databaseRefusal, fieldErrorsOf, logServerError } from "@/lib/errors";

/** What a result message says: saved and fine, saved but worth a look, or refused. */
export type ResultTone = "ok" | "warn" | "refused";

export interface ActionState<T = unknown> {
  ok: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
  /** The message's tone when it is not simply ok (saved) or refused (not saved). */
  tone?: ResultTone;
  /** What was saved, as the form shows it, so the form can show it without the page being rendered again. */
  saved?: T;
}

export const toneOf = (state: Pick<ActionState, "ok" | "tone">): ResultTone => state.tone ?? (state.ok ? "ok" : "refused");

export const initialActionState: ActionState<never> = { ok: false, message: null, fieldErrors: {} };

export function actionFailure(err: unknown): ActionState<never> {
  if (err instanceof ZodError) {
    return { ok: false, message: "Check the highlighted fields.", fieldErrors: fieldErrorsOf(err) };
  }
  const refusal = err instanceof AppError ? null : databaseRefusal(err);
  if (refusal) return { ok: false, message: refusal.message, fieldErrors: {} };
  if (err instanceof BadRequestError) return { ok: false, message: err.message, fieldErrors: err.fieldErrors };
  if (err instanceof AppError) return { ok: false, message: err.message, fieldErrors: {} };
  const requestId = currentRequestId();
  logServerError(err, requestId, "server error in an action");
  return {
    ok: false,
    message: `The change could not be saved. Nothing was changed; try again.${requestId ? ` If it keeps happening, give an admin this code: ${requestId}.` : ""}`,
    fieldErrors: {},
  };
}
