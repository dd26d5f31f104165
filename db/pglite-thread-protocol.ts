// What the app's thread and the database thread (db/pglite-thread.ts) say to each other. Every
// request carries an id and gets exactly one answer with that id. Values cross the thread
// boundary by structured clone; errors do not keep their own fields that way, so they are sent
// as plain records and built again on the other side with the same class, message and fields.
import {
  AppError,
  BadRequestError,
  ConflictError,
  DatabaseStartError,
  DatabaseStoppingError,
  ForbiddenError,
  NotFoundError,
  PayloadTooLargeError,
  UnauthorizedError,
  UnsupportedMediaTypeError,
} from "@/lib/errors";

export type QueryRowMode = "object" | "array";

export type ThreadRequest =
  | {
      id: number;
      op: "query";
      sql: string;
      params: unknown[];
      rowMode: QueryRowMode;
      /** Types whose text is returned as it is instead of being parsed (drizzle's own choice). */
      rawTypes: number[];
      tx?: number;
    }
  | { id: number; op: "exec"; sql: string; tx?: number }
  | { id: number; op: "begin" }
  | { id: number; op: "end"; tx: number; commit: boolean }
  /** One stroke save, for the thread's save queue (lib/bench/stroke-batch.ts) to batch. */
  | { id: number; op: "strokes"; save: unknown }
  | { id: number; op: "close" };

export type ThreadAnswer =
  | { id: number; ok: true; value: unknown }
  | { id: number; ok: false; error: SentError };

/** The thread's first message: the database is open, or why it is not. */
export type ThreadReady = { ready: true } | { ready: false; error: SentError };

export interface SentError {
  /** The class to build again: "app:" and one of ours, or any other name for a plain Error. */
  name: string;
  message: string;
  /** Own fields worth keeping: PostgreSQL's code, detail, constraint…; a bad request's fieldErrors. */
  fields: Record<string, unknown>;
}

const APP_ERRORS: Record<string, new (message: string) => AppError> = {
  BadRequestError,
  UnauthorizedError,
  ForbiddenError,
  NotFoundError,
  ConflictError,
  PayloadTooLargeError,
  UnsupportedMediaTypeError,
  DatabaseStartError,
  DatabaseStoppingError,
};

function plain(value: unknown): boolean {
  if (value === null) return true;
  const t = typeof value;
  if (t === "string" || t === "number" || t === "boolean") return true;
  if (t === "object") {
    try {
      structuredClone(value);
      return true;
    } catch {
      return false;
    }
  }
  return false;
}

export function sendError(err: unknown): SentError {
  if (!(err instanceof Error)) return { name: "Error", message: String(err), fields: {} };
  const fields: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(err)) {
    if (key !== "name" && key !== "message" && key !== "stack" && key !== "cause" && plain(value)) fields[key] = value;
  }
  if (err.cause !== undefined) fields.cause = err.cause instanceof Error ? sendError(err.cause) : plain(err.cause) ? err.cause : String(err.cause);
  // Ours by class, not by name: a bundler may rename a class.
  const ours = Object.entries(APP_ERRORS).find(([, C]) => err.constructor === C)?.[0];
  return { name: ours ? `app:${ours}` : err.name, message: err.message, fields };
}

function isSent(value: unknown): value is SentError {
  return typeof value === "object" && value !== null && "name" in value && "message" in value && "fields" in value;
}

export function receiveError(sent: SentError): Error {
  const AppClass = sent.name.startsWith("app:") ? APP_ERRORS[sent.name.slice(4)] : undefined;
  const { cause, fieldErrors, status: _status, ...rest } = sent.fields;
  let err: Error;
  if (AppClass === BadRequestError) {
    err = new BadRequestError(sent.message, (fieldErrors as Record<string, string[]> | undefined) ?? {});
  } else if (AppClass) {
    err = new AppClass(sent.message);
  } else {
    err = new Error(sent.message);
    // Not one of ours: keep its name (DatabaseError, …) for logs and messages.
    if (sent.name !== "Error") Object.defineProperty(err, "name", { value: sent.name, configurable: true, writable: true });
    if (fieldErrors !== undefined) rest.fieldErrors = fieldErrors;
  }
  Object.assign(err, rest);
  if (cause !== undefined) (err as Error & { cause?: unknown }).cause = isSent(cause) ? receiveError(cause) : cause;
  return err;
}
