// Request parsing shared by route handlers: JSON bodies and path ids validated with zod, with
// messages that say what was wrong.
import { z, type ZodType } from "zod";
import { BadRequestError, fieldErrorsOf, PayloadTooLargeError, UnsupportedMediaTypeError } from "@/lib/errors";

/**
 * The largest JSON body a route reads. The biggest one the app sends is a batch of 500 strokes,
 * about 120 kB; anything near a megabyte is not ours.
 */
export const MAX_JSON_BYTES = 1024 * 1024;

const tooLarge = (maxBytes: number) =>
  new PayloadTooLargeError(`The request body is larger than ${formatBytes(maxBytes)}. Send it in smaller parts.`);

function formatBytes(n: number): string {
  return n % 1048576 === 0 ? `${n / 1048576} MB` : n % 1024 === 0 ? `${n / 1024} kB` : `${n} bytes`;
}

/** application/json, or a structured type ending in +json (RFC 6839), parameters allowed. */
function isJsonType(header: string | null): boolean {
  const essence = (header ?? "").split(";")[0]!.trim().toLowerCase();
  return essence === "application/json" || /^application\/[a-z0-9!#$&^_.-]+\+json$/.test(essence);
}

/**
 * The body as text, read no further than `maxBytes`: a declared length over the limit is refused
 * before anything is read, an undeclared one as soon as the limit is passed.
 */
async function readLimitedText(req: Request, maxBytes: number): Promise<string> {
  const declared = req.headers.get("content-length");
  if (declared !== null && Number(declared) > maxBytes) {
    await req.body?.cancel().catch(() => {});
    throw tooLarge(maxBytes);
  }
  if (!req.body) return "";
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const next = await reader.read();
    if (next.done) break;
    total += next.value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => {});
      throw tooLarge(maxBytes);
    }
    chunks.push(next.value);
  }
  const bytes = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    bytes.set(c, at);
    at += c.byteLength;
  }
  return utf8(bytes);
}

export async function readJson<T>(req: Request, schema: ZodType<T>, maxBytes: number = MAX_JSON_BYTES): Promise<T> {
  if (!isJsonType(req.headers.get("content-type"))) {
    await req.body?.cancel().catch(() => {});
    throw notJson();
  }
  return parseJsonText(await readLimitedText(req, maxBytes), schema);
}

const notJson = () => new UnsupportedMediaTypeError("Send the body as JSON, with Content-Type: application/json.");

function utf8(bytes: Uint8Array): string {
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new BadRequestError("The request body must be JSON in UTF-8.");
  }
}

function parseJsonText<T>(text: string, schema: ZodType<T>): T {
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    throw new BadRequestError("The request body must be JSON.");
  }
  const parsed = schema.safeParse(body);
  if (!parsed.success) {
    const fields = fieldErrorsOf(parsed.error);
    const first = Object.entries(fields)[0];
    const message = !first ? "The request is not valid." : first[0] === "_form" ? `The request body is not valid: ${first[1][0]}` : `${first[0]}: ${first[1][0]}`;
    throw new BadRequestError(message, fields);
  }
  return parsed.data;
}

const uuid = z.string().uuid();

export function isUuid(value: unknown): value is string {
  return uuid.safeParse(value).success;
}

/** A path's id, in the lower case the database answers ids in. */
export function parseId(value: string, what: string): string {
  if (!isUuid(value)) throw new BadRequestError(`${what} must be a UUID.`);
  return value.toLowerCase();
}
