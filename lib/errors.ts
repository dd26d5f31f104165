// Domain errors, mapped to HTTP statuses in one place. Messages are written for the person
// at the bench: they say what happened and what to do, never a stack.
import { NextResponse } from "next/server";
import { ZodError } from "zod";

export class AppError extends Error {
  readonly status: number = 500;
  constructor(message: string) {
    super(message);
    this.name = new.target.name;
  }
}

export class BadRequestError extends AppError {
  override readonly status = 400;
  constructor(
    message: string,
    readonly fieldErrors: Record<string, string[]> = {},
  ) {
    super(message);
  }
}

export class UnauthorizedError extends AppError {
  override readonly status = 401;
  constructor(message = "Sign in to continue.") {
    super(message);
  }
}

export class ForbiddenError extends AppError {
  override readonly status = 403;
  constructor(message = "Your role does not allow this.") {
    super(message);
  }
}

export class NotFoundError extends AppError {
  override readonly status = 404;
}

export class ConflictError extends AppError {
  override readonly status = 409;
}

export class PayloadTooLargeError extends AppError {
  override readonly status = 413;
}

export class UnsupportedMediaTypeError extends AppError {
  override readonly status = 415;
}

export class DatabaseStartError extends AppError {
  override readonly status = 503;
}

/** The server is stopping: the request was not carried out and can be sent again. */
export class DatabaseStoppingError extends AppError {
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

/** The JSON body every API error shares. */
export interface ApiErrorBody {
  error: string;
  message: string;
  fieldErrors?: Record<string, string[]>;
}

/** The status and JSON body an error is answered with (errorResponse, and the production server's own stroke path). */
export function errorAnswer(err: unknown): { status: number; body: ApiErrorBody } {
  if (err instanceof ZodError) {
    return { status: 400, body: { error: "bad_request", message: "Some values are not valid.", fieldErrors: fieldErrorsOf(err) } };
  }
  if (err instanceof AppError) {
    const body: ApiErrorBody = { error: codeFor(err.status), message: err.message };
    if (err instanceof BadRequestError && Object.keys(err.fieldErrors).length) {
      body.fieldErrors = err.fieldErrors;
    }
    return { status: err.status, body };
  }
  console.error(err);
  return { status: 500, body: { error: "internal", message: "Something went wrong on the server. Try again in a moment." } };
}

export function errorResponse(err: unknown): NextResponse<ApiErrorBody> {
  const { status, body } = errorAnswer(err);
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
