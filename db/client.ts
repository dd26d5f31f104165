// The only place a database is opened: a PostgreSQL server when DATABASE_URL is set, else embedded
// PGlite in a data directory, served on its own socket (db/pglite-socket.ts) — node-postgres either way. Migrations (and the demo
// seed, on an empty database) are applied once per process, before the first query.
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { PgDatabase, PgQueryResultHKT } from "drizzle-orm/pg-core";
import * as schema from "./schema";
import { DatabaseStartError, DatabaseStoppingError } from "@/lib/errors";
import { serverEnv } from "@/lib/env";
import { installGracefulShutdown } from "./shutdown";

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
  thread?: {
    script: string | URL;
    execArgv?: string[];
    /** Told when the thread stops without being closed; by default the process stops. */
    onUnexpectedStop?: (err: Error) => void;
    /** Given the thread once it serves (a supervisor may watch or stop it). */
    onStarted?: (worker: import("node:worker_threads").Worker) => void;
  };
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
  const { servePglite, SOCKET_PORT } = await import("./pglite-socket");
  let served: { socketDir: string; close(): Promise<void> };
  try {
    served = options.thread ? await serveOnThread(dir, options.thread) : await servePglite(dir);
  } catch (err) {
    throw cannotOpen(dir, err);
  }
  let handle: DatabaseHandle;
  try {
    // One connection, kept open: PGlite runs one statement at a time, and its socket keeps an
    // exchange whole only within one connection (db/pglite-socket.ts).
    handle = await connect({ host: served.socketDir, port: SOCKET_PORT, user: "postgres", database: "postgres", max: 1, idleTimeoutMillis: 0 }, "pglite");
  } catch (err) {
    await served.close().catch(() => {});
    throw err instanceof DatabaseStartError ? err : cannotOpen(dir, err);
  }
  return {
    ...handle,
    onThread: Boolean(options.thread),
    close: async () => {
      await handle.close();
      await served.close();
    },
  };
}

/**
 * Starts the database thread (the built db/pglite-thread script) on `dir` and waits until it
 * serves. Without its database the server can answer nothing: should the thread stop on its own,
 * the process stops with one line, and whatever restarts it gets a database that replays its log,
 * as after any crash.
 */
async function serveOnThread(dir: string, thread: NonNullable<PgliteOptions["thread"]>): Promise<{ socketDir: string; close(): Promise<void> }> {
  const { Worker } = await import("node:worker_threads");
  const worker = new Worker(thread.script, { workerData: { dir }, execArgv: thread.execArgv });
  let closing = false;
  const socketDir = await new Promise<string>((resolve, reject) => {
    worker.once("message", (m: { ready: boolean; socketDir?: string; error?: string }) => (m.ready ? resolve(m.socketDir!) : reject(new Error(m.error))));
    worker.once("error", reject);
    worker.once("exit", (code) => reject(new Error(`The database thread stopped (exit code ${code}).`)));
  });
  const onStop = thread.onUnexpectedStop ?? ((err: Error) => {
    console.error(`Grindfade cannot go on: ${err.message} The server stops; start it again.`);
    process.exit(1);
  });
  let stopped = false;
  const stop = (err: Error) => {
    if (closing || stopped) return;
    stopped = true;
    onStop(err);
  };
  worker.on("error", stop);
  worker.on("exit", (code) => stop(new Error(`The database thread stopped (exit code ${code}).`)));
  thread.onStarted?.(worker);
  return {
    socketDir,
    close: async () => {
      closing = true;
      if (stopped) return;
      const closed = new Promise<void>((resolve, reject) => {
        worker.once("message", (m: { closed?: boolean; error?: string }) => (m.closed ? resolve() : reject(new Error(m.error))));
        worker.once("exit", () => resolve());
      });
      worker.postMessage("close");
      try {
        await closed;
      } finally {
        await worker.terminate();
      }
    },
  };
}

/** A pool on a PostgreSQL server, or on the embedded database's socket, migrated. */
async function connect(config: import("pg").PoolConfig, kind: DatabaseHandle["kind"]): Promise<DatabaseHandle> {
  const { Pool } = await import("pg");
  const { drizzle } = await import("drizzle-orm/node-postgres");
  const { migrate } = await import("drizzle-orm/node-postgres/migrator");
  const pool = new Pool({ connectionTimeoutMillis: 5000, max: 10, ...config });
  try {
    const c = await pool.connect();
    c.release();
  } catch (err) {
    await pool.end().catch(() => {});
    const reason = err instanceof Error ? err.message : String(err);
    throw new DatabaseStartError(
      kind === "postgres"
        ? `DATABASE_URL: the PostgreSQL server could not be reached (${reason || "connection refused"}).`
        : `The embedded database could not be reached on its socket (${reason}).`,
    );
  }
  // A connection lost while idle (the server restarted, the database thread stopped) is reported
  // by the pool as an event; unheard, it would stop the process. The pool drops that connection
  // and the next statement opens a new one; a thread that stopped is handled by its own watcher.
  pool.on("error", (err) => console.error(`The database connection was lost while idle (${err.message}); the next statement reconnects.`));
  const db = drizzle({ client: pool, schema });
  await migrate(db, { migrationsFolder: migrationsFolder() });
  // A checked-out client is running a query or holding a transaction.
  const busy = () => pool.waitingCount > 0 || pool.totalCount > pool.idleCount;
  return { db: db as unknown as Db, kind, busy, close: () => pool.end() };
}

function openPostgres(url: string): Promise<DatabaseHandle> {
  return connect({ connectionString: url }, "postgres");
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
