// The only place a database is opened. Embedded PGlite in a data directory by default; a
// PostgreSQL server through node-postgres when DATABASE_URL is set. Migrations (and the demo
// seed, on an empty database) are applied once per process, before the first query.
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { PgDatabase, PgQueryResultHKT } from "drizzle-orm/pg-core";
import * as schema from "./schema";
import { DatabaseStartError, DatabaseStoppingError } from "@/lib/errors";
import { serverEnv } from "@/lib/env";
import { installGracefulShutdown } from "./shutdown";
import { registerStrokeSubmitter } from "./stroke-submitters";

export type Db = PgDatabase<PgQueryResultHKT, typeof schema>;

export interface DatabaseHandle {
  db: Db;
  kind: "pglite" | "postgres";
  /** PGlite runs on a thread of its own (db/pglite-thread.ts). */
  onThread?: boolean;
  /** True while a query or transaction is running or waiting for its turn. */
  busy(): boolean;
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

/** Where PGlite runs: on the app's own thread, or on a thread of its own (the built db/pglite-thread script). */
export interface PgliteOptions {
  thread?: { script: string | URL; execArgv?: string[]; onUnexpectedStop?: (err: Error) => void };
}

function cannotOpen(dir: string, err: unknown): DatabaseStartError {
  return new DatabaseStartError(
    `GRINDFADE_DATA_DIR: the database in ${dir} could not be opened (${String(err)}). ` +
      `It may be damaged or in use by another process; stop other Grindfade processes, ` +
      `or restore it from a backup. It was left untouched.`,
  );
}

async function openPglite(dir: string, options: PgliteOptions = {}): Promise<DatabaseHandle> {
  checkPgliteDirectory(dir);
  fs.mkdirSync(dir, { recursive: true });
  const { drizzle } = await import("drizzle-orm/pglite");
  const { migrate } = await import("drizzle-orm/pglite/migrator");
  if (options.thread) {
    const { RemotePglite } = await import("./pglite-remote");
    let remote: Awaited<ReturnType<typeof RemotePglite.open>>;
    try {
      remote = await RemotePglite.open(dir, options.thread.script, { execArgv: options.thread.execArgv });
    } catch (err) {
      throw cannotOpen(dir, err);
    }
    // Without its database the server can answer nothing: it stops with one line, and whatever
    // restarts it gets a database that replays its log, as after any crash.
    remote.onUnexpectedStop = options.thread.onUnexpectedStop ?? ((err) => {
      console.error(`Grindfade cannot go on: ${err.message} The server stops; start it again.`);
      process.exit(1);
    });
    // drizzle's PGlite driver calls only what RemotePglite answers: query, exec and transaction.
    const db = drizzle({ client: remote as never, schema }) as unknown as Db;
    await migrate(db as never, { migrationsFolder: migrationsFolder() });
    registerStrokeSubmitter(db, (save) => remote.submitStrokes(save));
    return { db, kind: "pglite", onThread: true, busy: () => remote.busy(), close: () => remote.close() };
  }
  const { PGlite } = await import("@electric-sql/pglite");
  let client: InstanceType<typeof PGlite>;
  try {
    client = new PGlite(dir);
    await client.waitReady;
  } catch (err) {
    throw cannotOpen(dir, err);
  }
  const busy = countActivity(client);
  const db = drizzle({ client, schema });
  await migrate(db, { migrationsFolder: migrationsFolder() });
  return { db: db as unknown as Db, kind: "pglite", busy, close: () => client.close() };
}

/**
 * Counts the client's queries and transactions from the call until they settle (PGlite runs
 * one at a time, so this includes the ones waiting for their turn). The graceful stop reads it.
 */
function countActivity<C extends { query: unknown; exec: unknown; transaction: unknown }>(client: C): () => boolean {
  let inFlight = 0;
  for (const name of ["query", "exec", "transaction"] as const) {
    const original = (client[name] as (...args: unknown[]) => Promise<unknown>).bind(client);
    const counted = async (...args: unknown[]) => {
      inFlight++;
      try {
        return await original(...args);
      } finally {
        inFlight--;
      }
    };
    Object.defineProperty(client, name, { value: counted, configurable: true, writable: true });
  }
  return () => inFlight > 0;
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
  // A checked-out client is running a query or holding a transaction.
  const busy = () => pool.waitingCount > 0 || pool.totalCount > pool.idleCount;
  return { db: db as unknown as Db, kind: "postgres", busy, close: () => pool.end() };
}

/** Opens a database without touching the process-wide one (migration tests, scripts). */
export async function openDatabase(options: {
  databaseUrl?: string;
  pgliteDir?: string;
  pglite?: PgliteOptions;
}): Promise<DatabaseHandle> {
  if (options.databaseUrl) return openPostgres(options.databaseUrl);
  if (!options.pgliteDir) throw new DatabaseStartError("No database configured.");
  return openPglite(options.pgliteDir, options.pglite);
}

// On globalThis, not in module variables: Next bundles this module more than once (start-up
// and each route), and every copy must see the one database and the one stopping flag.
type GlobalWithDb = typeof globalThis & { __grindfadeDb?: Promise<DatabaseHandle>; __grindfadeStopping?: boolean };
const g = globalThis as GlobalWithDb;

/** The process-wide database: opened, migrated and seeded on first use, then reused. */
export function getDatabase(): Promise<DatabaseHandle> {
  // Once the server is stopping, new work is refused before it touches the database; the
  // caller is told to send it again (the bench outbox retries a 503).
  if (g.__grindfadeStopping) return Promise.reject(new DatabaseStoppingError());
  if (!g.__grindfadeDb) {
    const env = serverEnv();
    const opening = (async () => {
      const thread = env.GRINDFADE_DB_THREAD && env.GRINDFADE_DB_THREAD !== "off" ? { script: env.GRINDFADE_DB_THREAD } : undefined;
      const handle = await openDatabase({ databaseUrl: env.DATABASE_URL, pgliteDir: env.pgliteDir, pglite: { thread } });
      if (env.GRINDFADE_SEED === "demo") {
        const { seedDemoShop } = await import("./seed");
        await seedDemoShop(handle.db);
      }
      // Registered once: this runs inside the one shared opening.
      installGracefulShutdown(handle, { onStopping: () => (g.__grindfadeStopping = true) });
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
