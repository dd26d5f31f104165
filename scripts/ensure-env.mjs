// First-run helper for development: writes a random NEXTAUTH_SECRET and a local NEXTAUTH_URL
// into .env.local (git-ignored) so that no secret is ever committed.
import { randomBytes } from "node:crypto";
import { existsSync, readFileSync, writeFileSync } from "node:fs";

const file = ".env.local";
const current = existsSync(file) ? readFileSync(file, "utf8") : "";
const lines = [];
if (!/^NEXTAUTH_SECRET=/m.test(current) && !process.env.NEXTAUTH_SECRET) {
  lines.push(`NEXTAUTH_SECRET=${randomBytes(32).toString("base64url")}`);
}
if (!/^NEXTAUTH_URL=/m.test(current) && !process.env.NEXTAUTH_URL) {
  lines.push(`NEXTAUTH_URL=http://localhost:${process.env.PORT ?? 3000}`);
}
if (lines.length) {
  writeFileSync(file, (current && !current.endsWith("\n") ? current + "\n" : current) + lines.join("\n") + "\n");
  console.log(`Wrote ${lines.map((l) => l.split("=")[0]).join(", ")} to ${file}.`);
}
