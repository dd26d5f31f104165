// NEXTAUTH_SECRET is required in production; development gets one generated into .env.local
// by scripts/ensure-env.mjs, so no secret is ever committed.
export function authSecret(): string | undefined {
  return process.env.NEXTAUTH_SECRET || undefined;
}
