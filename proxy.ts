// Runs before every page and API request (not build assets): sets the content security policy
// with a fresh nonce, refuses changes that do not come from our own pages, and sends anonymous
// visitors to sign-in (anonymous API calls get a JSON 401). This gate is optimistic only: real
// authorisation happens in each page, action and route handler (lib/auth/guard.ts).
import { NextResponse, type NextRequest } from "next/server";
import { tokenUser } from "@/lib/auth/token";
import { API_POLICY, checkRequestOrigin, newNonce, pagePolicy } from "@/lib/security/headers";
import { actionBodyProblem, cleanCookieHeader, isServedMethod, METHOD_REFUSAL, SERVED_METHODS } from "@/lib/security/request-gate";

const dev = process.env.NODE_ENV === "development";

/** Reachable without signing in. */
function isPublic(pathname: string): boolean {
  return (
    pathname === "/sign-in" ||
    pathname.startsWith("/api/auth/") ||
    pathname === "/api/health" ||
    // A customer's report link: the token in it is the key (app/r/[token]/route.ts).
    pathname.startsWith("/r/") ||
    pathname.startsWith("/worklets/") ||
    pathname === "/bench-sw.js"
  );
}

const json = (status: number, body: { error: string; message: string }, headers: Record<string, string> = {}) => {
  const res = NextResponse.json(body, { status, headers });
  res.headers.set("Content-Security-Policy", API_POLICY);
  return res;
};

export async function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  const isApi = pathname.startsWith("/api/");

  // The production server refuses these before Next.js (server.ts); `next dev` gets here.
  if (!isServedMethod(req.method)) return json(405, METHOD_REFUSAL, { Allow: SERVED_METHODS.join(", ") });

  // next-auth's own routes carry their own CSRF token; everything else that changes state must
  // come from one of our pages (server actions are also checked by Next.js itself).
  if (!pathname.startsWith("/api/auth/")) {
    const verdict = checkRequestOrigin(req.method, req.headers);
    if (!verdict.ok) return json(403, { error: "forbidden", message: verdict.message });
  }

  // The request goes on with cookies next-auth can read: one of each name, and no sign-in
  // callback address of another site (next-auth answers a malformed one with a 500).
  const requestHeaders = new Headers(req.headers);
  const origins = [req.nextUrl.origin, ...(process.env.NEXTAUTH_URL && URL.canParse(process.env.NEXTAUTH_URL) ? [new URL(process.env.NEXTAUTH_URL).origin] : [])];
  const cookie = cleanCookieHeader(req.headers.get("cookie"), origins);
  if (cookie !== null) requestHeaders.set("cookie", cookie);

  // A server action's body the framework cannot read is refused here, not by a 500 there.
  const type = req.headers.get("content-type") ?? "";
  if (req.method === "POST" && !isApi && (req.headers.has("next-action") || /^\s*multipart\/form-data/i.test(type))) {
    const problem = await actionBodyProblem(req.clone());
    if (problem) return json(400, { error: "bad_request", message: problem });
  }

  if (!isPublic(pathname)) {
    const user = await tokenUser(requestHeaders).catch(() => null);
    if (!user) {
      if (isApi) return json(401, { error: "unauthorized", message: "Sign in to continue." });
      const url = req.nextUrl.clone();
      url.pathname = "/sign-in";
      url.search = "";
      if (pathname !== "/") url.searchParams.set("callbackUrl", `${pathname}${search}`);
      return NextResponse.redirect(url);
    }
  }

  if (isApi) {
    const res = NextResponse.next({ request: { headers: requestHeaders } });
    res.headers.set("Content-Security-Policy", API_POLICY);
    return res;
  }
  // Next.js reads the nonce from the request's policy header and puts it on its own scripts.
  const nonce = newNonce();
  const policy = pagePolicy(nonce, dev);
  requestHeaders.set("x-nonce", nonce);
  requestHeaders.set("Content-Security-Policy", policy);
  const res = NextResponse.next({ request: { headers: requestHeaders } });
  res.headers.set("Content-Security-Policy", policy);
  return res;
}

export const config = {
  // Everything but build assets and the fonts and icons in public/.
  matcher: ["/((?!_next/static|_next/image|favicon\\.ico|icon\\.svg|fonts/).*)"],
};
