// Seeds the invented demo shop into an empty database; does nothing when a shop exists.
import { openDatabase } from "@/db/client";
import { seedDemoShop } from "@/db/seed";
import { serverEnv } from "@/lib/env";

async function main() {
  const env = serverEnv();
  const handle = await openDatabase({ databaseUrl: env.DATABASE_URL, pgliteDir: env.pgliteDir });
  const seeded = await seedDemoShop(handle.db);
  console.log(seeded ? "Demo shop seeded." : "Database already has a shop; nothing seeded.");
  await handle.close();
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
