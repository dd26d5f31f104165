// Request parsing shared by route handlers: JSON bodies and path ids validated with zod, with
// messages that say what was wrong.
import { z, type ZodType } from "zod";
import { BadRequestError, fieldErrorsOf } from "@/lib/errors";

export async function readJson<T>(req: Request, schema: ZodType<T>): Promise<T> {
  let body: unknown;
  try {
    body = await req.json();
  } catch {
    throw new BadRequestError("The request body must be JSON.");
  }
  const parsed = schema.safeParse(body);
  if (!parsed.success) {
    const fields = fieldErrorsOf(parsed.error);
    const first = Object.entries(fields)[0];
    throw new BadRequestError(first ? `${first[0]}: ${first[1][0]}` : "The request is not valid.", fields);
  }
  return parsed.data;
}

const uuid = z.string().uuid();

export function parseId(value: string, what: string): string {
  if (!uuid.safeParse(value).success) throw new BadRequestError(`${what} must be a UUID.`);
  return value;
}
