// Who is signed in, read straight from the session cookie of a plain Request: for the production
// server's own request path (server.ts), which runs outside Next.js's request context and so
// cannot use getServerSession. The token is the same one next-auth writes and checks.
import { hkdfSync } from "node:crypto";
import { jwtDecrypt } from "jose";
import { getToken, type JWT } from "next-auth/jwt";
import type { UserRole } from "@/db/schema";

// next-auth's own decode derives the key again for every token, on the thread pool; a stroke save
// arrives for every stroke, so the key is derived once per secret here. Same derivation (HKDF
// with SHA-256, RFC 5869, next-auth's info string, no salt) and the same checks (A256GCM, expiry
// with 15 s of clock tolerance); tests/auth/token.test.ts reads tokens next-auth wrote.
const keys = new Map<string, Uint8Array>();
function encryptionKey(secret: string): Uint8Array {
  let key = keys.get(secret);
  if (!key) {
    key = new Uint8Array(hkdfSync("sha256", secret, "", "NextAuth.js Generated Encryption Key", 32));
    keys.set(secret, key);
  }
  return key;
}

async function decode({ token, secret }: { token?: string; secret: string | Buffer }): Promise<JWT | null> {
  if (!token) return null;
  const { payload } = await jwtDecrypt(token, encryptionKey(String(secret)), { clockTolerance: 15 });
  return payload as JWT;
}

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
    decode,
  });
  return token?.uid && token.role ? { id: token.uid, role: token.role } : null;
}
