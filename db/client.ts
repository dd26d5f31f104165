// The only place a database is opened. Embedded PGlite in a data directory by default; a
// PostgreSQL server through node-postgres when DATABASE_URL is set. Migrations (and the demo
// seed, on an empty database) are applied once per process, before the first query.
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { PgDatabase, PgQueryResultHKT } from "drizzle-orm/pg-core";
import * as schema from "./schema";
import { DatabaseStartError } from "@/lib/errors";
import { serverEnv } from "@/lib/env";

export type Db = PgDatabase<PgQueryResultHKT, typeof schema>;

export interface DatabaseHandle {
  db: Db;
  kind: "pglite" | "postgres";
  close(): Promise<void>;
}

/** PGlite 0.5.x embeds PostgreSQL 18; a directory of another major version cannot be opened. */
export const PGLITE_MAJOR_VERSION = "18";

export function migrationsFolder(): string {
  // Absolute path: the migrators read the journal from disk, and Next bundles this module.
  const candidates = [
    path.join(process.cwd(), "db", "migrations"),
    path.join(path.dirname(fileURLToPath(import.meta.url)), "migrations"),
  ];
  const found = candidates.find((p) => fs.existsSync(path.join(p, "meta", "_journal.json")));
  if (!found) throw new DatabaseStartError("Migrations folder db/migrations was not found.");
  return found;
}

/**
 * Refuses a directory that holds something other than a PGlite cluster of our major version,
 * so that a mistyped GRINDFADE_DATA_DIR never gets a database written over someone's files.
 */
export function checkPgliteDirectory(dir: string): "new" | "existing" {
  if (!fs.existsSync(dir)) return "new";
  const stat = fs.statSync(dir);
  if (!stat.isDirectory()) {
    throw new DatabaseStartError(
      `GRINDFADE_DATA_DIR: ${dir} is a file, not a directory. Point GRINDFADE_DATA_DIR elsewhere.`,
    );
  }
  const entries = fs.readdirSync(dir);
  if (entries.length === 0) return "new";
  const versionFile = path.join(dir, "PG_VERSION");
  if (!fs.existsSync(versionFile)) {
    throw new DatabaseStartError(
      `GRINDFADE_DATA_DIR: ${dir} is not empty and holds no database. It was left untouched; ` +
        `point GRINDFADE_DATA_DIR at an empty or new folder.`,
    );
  }
  const version = fs.readFileSync(versionFile, "utf8").trim();
  if (version !== PGLITE_MAJOR_VERSION) {
    throw new DatabaseStartError(
      `GRINDFADE_DATA_DIR: ${dir} holds a PostgreSQL ${version} database; this build needs ` +
        `${PGLITE_MAJOR_VERSION}. It was left untouched; dump it with the old version or use a new folder.`,
    );
  }
  return "existing";
}

async function openPglite(dir: string): Promise<DatabaseHandle> {
  checkPgliteDirectory(dir);
  fs.mkdirSync(dir, { recursive: true });
  const { PGlite } = await import("@electric-sql/pglite");
  const { drizzle } = await import("drizzle-orm/pglite");
  const { migrate } = await import("drizzle-orm/pglite/migrator");
  let client: InstanceType<typeof PGlite>;
  try {
    client = new PGlite(dir);
    await client.waitReady;
  } catch (err) {
    throw new DatabaseStartError(
      `GRINDFADE_DATA_DIR: the database in ${dir} could not be opened (${String(err)}). ` +
        `It may be damaged or in use by another process; stop other Grindfade processes, ` +
        `or restore it from a backup. It was left untouched.`,
    );
  }
  const db = drizzle({ client, schema });
  await migrate(db, { migrationsFolder: migrationsFolder() });
  return { db: db as unknown as Db, kind: "pglite", close: () => client.close() };
}

async function openPostgres(url: string): Promise<DatabaseHandle> {
  const { Pool } = await import("pg");
  const { drizzle } = await import("drizzle-orm/node-postgres");
  const { migrate } = await import("drizzle-orm/node-postgres/migrator");
  const pool = new Pool({ connectionString: url, connectionTimeoutMillis: 5000, max: 10 });
  try {
    const c = await pool.connect();
    c.release();
  } catch (err) {
    await pool.end().catch(() => {});
    const reason = err instanceof Error ? err.message : String(err);
    throw new DatabaseStartError(
      `DATABASE_URL: the PostgreSQL server could not be reached (${reason || "connection refused"}).`,
    );
  }
  const db = drizzle({ client: pool, schema });
  await migrate(db, { migrationsFolder: migrationsFolder() });
  return { db: db as unknown as Db, kind: "postgres", close: () => pool.end() };
}

/** Opens a database without touching the process-wide one (migration tests, scripts). */
export async function openDatabase(options: {
  databaseUrl?: string;
  pgliteDir?: string;
}): Promise<DatabaseHandle> {
  if (options.databaseUrl) return openPostgres(options.databaseUrl);
  if (!options.pgliteDir) throw new DatabaseStartError("No database configured.");
  return openPglite(options.pgliteDir);
}

type GlobalWithDb = typeof globalThis & { __grindfadeDb?: Promise<DatabaseHandle> };
const g = globalThis as GlobalWithDb;

/** The process-wide database: opened, migrated and seeded on first use, then reused. */
export function getDatabase(): Promise<DatabaseHandle> {
  if (!g.__grindfadeDb) {
    const env = serverEnv();
    const opening = (async () => {
      const handle = await openDatabase({ databaseUrl: env.DATABASE_URL, pgliteDir: env.pgliteDir });
      if (env.GRINDFADE_SEED === "demo") {
        const { seedDemoShop } = await import("./seed");
        await seedDemoShop(handle.db);
      }
      registerShutdown(handle);
      return handle;
    })();
    // A failed start is not cached: the next request tries again after the cause is fixed.
    opening.catch(() => {
      if (g.__grindfadeDb === opening) g.__grindfadeDb = undefined;
    });
    g.__grindfadeDb = opening;
  }
  return g.__grindfadeDb;
}

export async function getDb(): Promise<Db> {
  return (await getDatabase()).db;
}

let shutdownRegistered = false;
function registerShutdown(handle: DatabaseHandle) {
  if (shutdownRegistered) return;
  shutdownRegistered = true;
  const close = (signal: NodeJS.Signals) => {
    handle
      .close()
      .catch(() => {})
      .finally(() => process.exit(signal === "SIGINT" ? 130 : 143));
  };
  process.once("SIGTERM", close);
  process.once("SIGINT", close);
}
