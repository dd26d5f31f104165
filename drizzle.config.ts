import type { Config } from "drizzle-kit";

// `generate` needs no database; migrations are applied by db/migrate.ts at start-up.
export default {
  dialect: "postgresql",
  schema: "./db/schema.ts",
  out: "./db/migrations",
  strict: true,
  verbose: true,
} satisfies Config;
