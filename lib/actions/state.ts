// The shape every server action returns to its form.
import { ZodError } from "zod";
import { AppError, BadRequestError, currentRequestId, databaseRefusal, fieldErrorsOf, logServerError } from "@/lib/errors";

export interface ActionState {
  ok: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
}

export const initialActionState: ActionState = { ok: false, message: null, fieldErrors: {} };

export function actionFailure(err: unknown): ActionState {
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
