// Requests refused before the framework sees them, each with a 4xx and a sentence: a method the
// app does not serve, a server-action request whose body is not what the framework reads, and
// cookies that would trip next-auth (a second copy of a name, a callback address that is not one).

/** The methods some route of ours answers. Anything else (TRACE, PROPFIND, …) is answered 405. */
export const SERVED_METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"] as const;

export function isServedMethod(method: string | undefined): boolean {
  return (SERVED_METHODS as readonly string[]).includes(method ?? "");
}

export const METHOD_REFUSAL = {
  error: "method_not_allowed",
  message: `This address does not take that method. Use one of ${SERVED_METHODS.join(", ")}.`,
} as const;

const CALLBACK_COOKIE = /^(?:__Secure-)?next-auth\.callback-url$/;

/**
 * The Cookie header with only the first of each name (browsers send the most specific first) and
 * without a sign-in callback address that is not an address of one of `origins`; null when nothing changed.
 */
export function cleanCookieHeader(header: string | null, origins: readonly string[]): string | null {
  if (!header) return null;
  const seen = new Set<string>();
  const kept: string[] = [];
  let changed = false;
  for (const raw of header.split(";")) {
    const part = raw.trim();
    if (!part) continue;
    const eq = part.indexOf("=");
    const name = eq < 0 ? part : part.slice(0, eq).trim();
    if (seen.has(name) || (CALLBACK_COOKIE.test(name) && !isAddressOf(part.slice(eq + 1), origins))) {
      changed = true;
      continue;
    }
    seen.add(name);
    kept.push(part);
  }
  return changed ? kept.join("; ") : null;
}

function isAddressOf(encoded: string, origins: readonly string[]): boolean {
  let value: string;
  try {
    value = decodeURIComponent(encoded.trim());
  } catch {
    return false;
  }
  return URL.canParse(value) && origins.includes(new URL(value).origin);
}

/**
 * Why a server-action request's body cannot be what the framework reads, or null when it can be.
 * The page's own calls send the action's arguments as a JSON array (text/plain) or as form data
 * whose field "0" holds that array; a form sent without JavaScript carries $ACTION_ fields.
 */
export async function actionBodyProblem(req: Request): Promise<string | null> {
  const type = (req.headers.get("content-type") ?? "").split(";")[0]!.trim().toLowerCase();
  if (type === "multipart/form-data") {
    let form: FormData;
    try {
      form = await req.formData();
    } catch {
      return "The form data could not be read. Reload the page and send it again.";
    }
    const root = form.get("0");
    if (typeof root === "string") return isJsonArray(root) ? null : "The form data is not what this page sends. Reload the page and try again.";
    return [...form.keys()].some((k) => k.startsWith("$ACTION_")) ? null : "The form data is not what this page sends. Reload the page and try again.";
  }
  if (type === "application/x-www-form-urlencoded") return null;
  return isJsonArray(await req.text()) ? null : "The request is not what this page sends. Reload the page and try again.";
}

function isJsonArray(text: string): boolean {
  try {
    return Array.isArray(JSON.parse(text));
  } catch {
    return false;
  }
}
