// Applies the committed migrations to the configured database (PGlite or DATABASE_URL).
import { openDatabase } from "@/db/client";
import { serverEnv } from "@/lib/env";

async function main() {
  const env = serverEnv();
  const handle = await openDatabase({ databaseUrl: env.DATABASE_URL, pgliteDir: env.pgliteDir });
  console.log(`Migrations applied (${handle.kind}).`);
  await handle.close();
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
