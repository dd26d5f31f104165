// Who is signed in, read straight from the session cookie of a plain Request: for the production
// server's own request path (server.ts), which runs outside Next.js's request context and so
// cannot use getServerSession. The token is the same one next-auth writes and checks.
import { hkdfSync } from "node:crypto";
import type { IncomingHttpHeaders } from "node:http";
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

// The same phone sends the same token with every stroke: a token read once is kept, by its exact
// text, until it expires. A token is sealed (A256GCM), so the same text always opens to the same
// claims; only tokens that opened are kept, at most MAX_KEPT, the oldest going first.
const MAX_KEPT = 5000;
const CLOCK_TOLERANCE_S = 15;
const opened = new Map<string, { secret: string; payload: JWT }>();

function stillValid(payload: JWT): boolean {
  const exp = typeof payload.exp === "number" ? payload.exp : Number.POSITIVE_INFINITY;
  return Date.now() / 1000 <= exp + CLOCK_TOLERANCE_S;
}

async function decode({ token, secret }: { token?: string; secret: string | Buffer }): Promise<JWT | null> {
  if (!token) return null;
  const key = String(secret);
  const kept = opened.get(token);
  if (kept && kept.secret === key) {
    if (stillValid(kept.payload)) return kept.payload;
    opened.delete(token);
  }
  const { payload } = await jwtDecrypt(token, encryptionKey(key), { clockTolerance: CLOCK_TOLERANCE_S });
  if (opened.size >= MAX_KEPT) opened.delete(opened.keys().next().value!);
  opened.set(token, { secret: key, payload: payload as JWT });
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

/** Who the session cookie names: from a web Request's headers, or from Node's own request headers. */
export async function tokenUser(headers: Headers | IncomingHttpHeaders): Promise<{ id: string; role: UserRole; sv: number } | null> {
  const cookie = headers instanceof Headers ? headers.get("cookie") : (headers.cookie ?? null);
  const token = await getToken({
    req: { headers, cookies: parseCookies(cookie) } as unknown as Parameters<typeof getToken>[0]["req"],
    secret: process.env.NEXTAUTH_SECRET,
    decode,
  });
  return token?.uid && token.role ? { id: token.uid, role: token.role, sv: typeof token.sv === "number" ? token.sv : 0 } : null;
}
