// Signing in over plain HTTP, as the sign-in form does through next-auth's credentials flow:
// fetch the form token (and its cookie), post the credentials with it, keep the cookies set.
// Shared by the browser-free end-to-end tests and the scripts that drive the production server.

export interface HttpSignIn {
  /** A Cookie header carrying every cookie set on the way (form token and session). */
  cookie: string;
  /** Set-Cookie lines of the credentials answer and of the form-token answer. */
  setCookies: string[];
  csrfSetCookies: string[];
  /** Where next-auth sends the browser next; carries `error=` when sign-in was refused. */
  location: string;
  status: number;
  signedIn: boolean;
}

export async function signInOverHttp(baseURL: string, email: string, password: string, extraHeaders: Record<string, string> = {}): Promise<HttpSignIn> {
  const jar = new Map<string, string>();
  const keep = (lines: string[]) => {
    for (const line of lines) {
      const pair = line.split(";")[0]!;
      const at = pair.indexOf("=");
      jar.set(pair.slice(0, at), pair.slice(at + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrfRes = await fetch(`${baseURL}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const csrfSetCookies = csrfRes.headers.getSetCookie();
  keep(csrfSetCookies);
  const res = await fetch(`${baseURL}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { ...extraHeaders, "content-type": "application/x-www-form-urlencoded", origin: baseURL, cookie: cookie() },
    body: new URLSearchParams({ csrfToken, email, password, callbackUrl: `${baseURL}/jobs`, json: "true" }),
  });
  const setCookies = res.headers.getSetCookie();
  keep(setCookies);
  const location = res.headers.get("location") ?? ((await res.json().catch(() => ({}))) as { url?: string }).url ?? "";
  const signedIn = [...jar.keys()].some((k) => k.endsWith("next-auth.session-token"));
  return { cookie: cookie(), setCookies, csrfSetCookies, location, status: res.status, signedIn };
}

/** The Cookie header of a signed-in session; throws when sign-in is refused. */
export async function sessionCookie(baseURL: string, email: string, password: string): Promise<string> {
  const result = await signInOverHttp(baseURL, email, password);
  if (!result.signedIn) throw new Error(`sign-in as ${email} failed (HTTP ${result.status}): ${decodeURIComponent(result.location)}`);
  return result.cookie;
}
