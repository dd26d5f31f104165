// Runs before every page and API request (not build assets): sets the content security policy
// with a fresh nonce, refuses changes that do not come from our own pages, and sends anonymous
// visitors to sign-in (anonymous API calls get a JSON 401). This gate is optimistic only: real
// authorisation happens in each page, action and route handler (lib/auth/guard.ts).
import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";
import { API_POLICY, checkRequestOrigin, newNonce, pagePolicy } from "@/lib/security/headers";

const dev = process.env.NODE_ENV === "development";

/** Reachable without signing in. */
function isPublic(pathname: string): boolean {
  return (
    pathname === "/sign-in" ||
    pathname.startsWith("/api/auth/") ||
    pathname === "/api/health" ||
    pathname.startsWith("/worklets/") ||
    pathname === "/bench-sw.js"
  );
}

export async function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  const isApi = pathname.startsWith("/api/");

  // next-auth's own routes carry their own CSRF token; everything else that changes state must
  // come from one of our pages (server actions are also checked by Next.js itself).
  if (!pathname.startsWith("/api/auth/")) {
    const verdict = checkRequestOrigin(req.method, req.headers);
    if (!verdict.ok) {
      const res = NextResponse.json({ error: "forbidden", message: verdict.message }, { status: 403 });
      res.headers.set("Content-Security-Policy", API_POLICY);
      return res;
    }
  }

  if (!isPublic(pathname)) {
    const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET });
    if (!token) {
      if (isApi) {
        const res = NextResponse.json({ error: "unauthorized", message: "Sign in to continue." }, { status: 401 });
        res.headers.set("Content-Security-Policy", API_POLICY);
        return res;
      }
      const url = req.nextUrl.clone();
      url.pathname = "/sign-in";
      url.search = "";
      if (pathname !== "/") url.searchParams.set("callbackUrl", `${pathname}${search}`);
      return NextResponse.redirect(url);
    }
  }

  if (isApi) {
    const res = NextResponse.next();
    res.headers.set("Content-Security-Policy", API_POLICY);
    return res;
  }
  // Next.js reads the nonce from the request's policy header and puts it on its own scripts.
  const nonce = newNonce();
  const policy = pagePolicy(nonce, dev);
  const requestHeaders = new Headers(req.headers);
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
