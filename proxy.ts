// Optimistic gate only: anonymous visitors go to sign-in, anonymous API calls get a JSON 401.
// Real authorisation happens in each page, action and route handler (lib/auth/guard.ts).
import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";

export async function proxy(req: NextRequest) {
  const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET });
  if (token) return NextResponse.next();
  const { pathname, search } = req.nextUrl;
  if (pathname.startsWith("/api/")) {
    return NextResponse.json(
      { error: "unauthorized", message: "Sign in to continue." },
      { status: 401 },
    );
  }
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  url.search = "";
  if (pathname !== "/") url.searchParams.set("callbackUrl", `${pathname}${search}`);
  return NextResponse.redirect(url);
}

export const config = {
  // Everything but sign-in, next-auth's own routes, health check, build assets and static files.
  matcher: ["/((?!sign-in|api/auth|api/health|_next/|favicon\\.ico|icon\\.svg|fonts/).*)"],
};
