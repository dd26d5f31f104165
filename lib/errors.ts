// Domain errors, mapped to HTTP statuses in one place. Messages are written for the person
// at the bench: they say what happened and what to do, never a stack.
import { NextResponse } from "next/server";
import { ZodError } from "zod";


// Every error carries the kinds it is (its class and those above it) under a process-wide symbol,
// and `instanceof` reads them: the production server's own bundle (server.ts) and Next.js's
// bundles each hold a copy of these classes, and an error made by one copy must still be
// recognised by another.
const KINDS = Symbol.for("grindfade.error.kinds");

export class AppError extends Error {
  static readonly kind: string = "AppError";
  readonly status: number = 500;
  constructor(message: string) {
    super(message);
    this.name = new.target.name;
    const kinds: string[] = [];
    for (let c: unknown = new.target; typeof c === "function" && c !== Error; c = Object.getPrototypeOf(c)) {
      const kind = (c as { kind?: unknown }).kind;
      if (typeof kind === "string" && Object.hasOwn(c, "kind")) kinds.push(kind);
    }
    Object.defineProperty(this, KINDS, { value: kinds, enumerable: false });
  }

  static [Symbol.hasInstance](value: unknown): boolean {
    if (typeof value !== "object" || value === null) return false;
    const kinds = (value as { [KINDS]?: unknown })[KINDS];
    if (Array.isArray(kinds)) return kinds.includes((this as unknown as { kind: string }).kind);
    return Function.prototype[Symbol.hasInstance].call(this, value);
  }
}

export class BadRequestError extends AppError {
  static override readonly kind: string = "BadRequestError";
  override readonly status = 400;
  constructor(
    message: string,
    readonly fieldErrors: Record<string, string[]> = {},
  ) {
    super(message);
  }
}

export class UnauthorizedError extends AppError {
  static override readonly kind: string = "UnauthorizedError";
  override readonly status = 401;
  constructor(message = "Sign in to continue.") {
    super(message);
  }
}

export class ForbiddenError extends AppError {
  static override readonly kind: string = "ForbiddenError";
  override readonly status = 403;
  constructor(message = "Your role does not allow this.") {
    super(message);
  }
}

export class NotFoundError extends AppError {
  static override readonly kind: string = "NotFoundError";
  override readonly status = 404;
}

export class ConflictError extends AppError {
  static override readonly kind: string = "ConflictError";
  override readonly status = 409;
}

export class PayloadTooLargeError extends AppError {
  static override readonly kind: string = "PayloadTooLargeError";
  override readonly status = 413;
}

export class UnsupportedMediaTypeError extends AppError {
  static override readonly kind: string = "UnsupportedMediaTypeError";
  override readonly status = 415;
}

export class DatabaseStartError extends AppError {
  static override readonly kind: string = "DatabaseStartError";
  override readonly status = 503;
}

/** The server is stopping: the request was not carried out and can be sent again. */
export class DatabaseStoppingError extends AppError {
  static override readonly kind: string = "DatabaseStoppingError";
  override readonly status = 503;
  constructor(message = "Grindfade is restarting; nothing was changed. Send it again in a moment.") {
    super(message);
  }
}

export function fieldErrorsOf(error: ZodError): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "_form";
    (out[key] ??= []).push(issue.message);
  }
  return out;
}

// The server's logger (lib/log.ts, pino) registers itself here when it loads; this module is also
// in the browser's bundle (through the actions' shared state), which must not pull in pino or
// node:async_hooks. Until then, or in the browser, lines go to the console as JSON.
interface LogSink {
  error(fields: object, message: string): void;
  info(fields: object, message: string): void;
}
const SINK = Symbol.for("grindfade.log.sink");
const CONTEXT = Symbol.for("grindfade.log.requestContext");
type GlobalWithLog = typeof globalThis & { [SINK]?: LogSink; [CONTEXT]?: { getStore(): { requestId: string } | undefined } };
const consoleSink: LogSink = {
  error: (fields, message) => console.error(JSON.stringify({ level: "error", msg: message, ...fields, err: String((fields as { err?: unknown }).err) })),
  info: () => {},
};
const logSink = (): LogSink => (globalThis as GlobalWithLog)[SINK] ?? consoleSink;

/** The id of the request being answered (lib/log.ts's request context), when there is one. */
export const currentRequestId = (): string | undefined => (globalThis as GlobalWithLog)[CONTEXT]?.getStore()?.requestId;

/** Logs a server error with its stack, once, under the request's id. */
export function logServerError(err: unknown, requestId: string | undefined, message = "server error"): void {
  logSink().error({ requestId, err }, message);
}

/** PostgreSQL's SQLSTATE of an error, or of the error it wraps (drizzle wraps the driver's). */
function sqlState(err: unknown): string | null {
  for (let e: unknown = err, depth = 0; e && typeof e === "object" && depth < 4; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === "string" && /^[0-9A-Z]{5}$/.test(code)) return code;
  }
  return null;
}

/**
 * A refusal by the database that says something about the request or the moment, not a fault of
 * the server: the same row written twice at once, two writers waiting for each other, a value a
 * column cannot hold. Checks before the database should catch the last kind; this keeps any that
 * slip through from being answered as a server error.
 */
export function databaseRefusal(err: unknown): AppError | null {
  const code = sqlState(err);
  if (!code) return null;
  if (code === "23505") return new ConflictError("Someone saved the same thing at the same moment. Reload and check before saving again.");
  if (code === "40001" || code === "40P01" || code === "55P03") {
    return new DatabaseStoppingError("The database was busy with the same records; nothing was changed. Send it again.");
  }
  // Class 22: data exceptions (a number, date or text a column cannot hold); 23: other integrity rules.
  if (code.startsWith("22") || code === "23502" || code === "23503" || code === "23514") {
    return new BadRequestError("A value is outside what can be stored. Check the figures and dates and send it again.");
  }
  return null;
}

/** The JSON body every API error shares. */
export interface ApiErrorBody {
  error: string;
  message: string;
  fieldErrors?: Record<string, string[]>;
  /** On a server error: the id its log line carries. */
  requestId?: string;
}

/**
 * The status and JSON body an error is answered with (errorResponse's, and a test's to read). A refusal is logged as one line without a stack; a server error logs its
 * stack once, with the request id that its answer also carries.
 */
export function errorAnswer(err: unknown, requestId: string | undefined = currentRequestId()): { status: number; body: ApiErrorBody } {
  const answer = answerFor(err);
  if (answer.status >= 500 && answer.body.error === "internal") {
    const id = requestId ?? "none";
    logServerError(err, id);
    answer.body.requestId = id;
    answer.body.message = `Something went wrong on the server. Try again in a moment; if it keeps happening, give an admin this code: ${id}.`;
  } else {
    logSink().info({ requestId, status: answer.status, error: answer.body.error }, answer.body.message);
  }
  return answer;
}

function answerFor(err: unknown): { status: number; body: ApiErrorBody } {
  if (err instanceof ZodError) {
    return { status: 400, body: { error: "bad_request", message: "Some values are not valid.", fieldErrors: fieldErrorsOf(err) } };
  }
  const refusal = err instanceof AppError ? null : databaseRefusal(err);
  if (refusal) return answerFor(refusal);
  if (err instanceof AppError) {
    const body: ApiErrorBody = { error: codeFor(err.status), message: err.message };
    if (err instanceof BadRequestError && Object.keys(err.fieldErrors).length) {
      body.fieldErrors = err.fieldErrors;
    }
    return { status: err.status, body };
  }
  return { status: 500, body: { error: "internal", message: "Something went wrong on the server. Try again in a moment." } };
}

export function errorResponse(err: unknown, requestId?: string): NextResponse<ApiErrorBody> {
  const { status, body } = errorAnswer(err, requestId ?? currentRequestId());
  return NextResponse.json(body, { status });
}

function codeFor(status: number): string {
  switch (status) {
    case 400:
      return "bad_request";
    case 401:
      return "unauthorized";
    case 403:
      return "forbidden";
    case 404:
      return "not_found";
    case 409:
      return "conflict";
    case 413:
      return "too_large";
    case 415:
      return "unsupported_media_type";
    case 503:
      return "unavailable";
    default:
      return "error";
  }
}
