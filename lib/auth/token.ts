// Who is signed in, read straight from the session cookie of a plain Request: for the production
// server's own request path (server.ts), which runs outside Next.js's request context and so
// cannot use getServerSession. The token is the same one next-auth writes and checks.
import { getToken } from "next-auth/jwt";
import type { UserRole } from "@/db/schema";

function parseCookies(header: string | null): Map<string, string> {
  const jar = new Map<string, string>();
  for (const part of (header ?? "").split(";")) {
    const eq = part.indexOf("=");
    if (eq < 1) continue;
    const name = part.slice(0, eq).trim();
    let value = part.slice(eq + 1).trim();
    if (value.startsWith('"') && value.endsWith('"')) value = value.slice(1, -1);
    try {
      value = decodeURIComponent(value);
    } catch {
      continue;
    }
    if (!jar.has(name)) jar.set(name, value);
  }
  return jar;
}

export async function tokenUser(req: Request): Promise<{ id: string; role: UserRole } | null> {
  const token = await getToken({
    req: { headers: req.headers, cookies: parseCookies(req.headers.get("cookie")) } as unknown as Parameters<typeof getToken>[0]["req"],
    secret: process.env.NEXTAUTH_SECRET,
  });
  return token?.uid && token.role ? { id: token.uid, role: token.role } : null;
}
