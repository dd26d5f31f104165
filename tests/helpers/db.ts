// Fresh databases for tests: a PGlite directory of its own, or a new database on the
// PostgreSQL server named by TEST_DATABASE_URL.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { openDatabase, type DatabaseHandle } from "@/db/client";

export interface TestDatabase extends DatabaseHandle {
  cleanup(): Promise<void>;
  dir?: string;
}

let threadScript: Promise<string> | null = null;

/**
 * The database thread (db/pglite-thread.ts) built as `npm run build` builds it, once per test
 * process, under node_modules/.cache so that its packages resolve as they do from .next.
 */
export function builtThreadScript(): Promise<string> {
  threadScript ??= (async () => {
    // node_modules/.cache is not there after a fresh install.
    const cache = path.join(process.cwd(), "node_modules", ".cache");
    fs.mkdirSync(cache, { recursive: true });
    // One build per test process; test workers are not always let exit, so older builds are
    // cleared here instead.
    for (const old of fs.readdirSync(cache).filter((n) => n.startsWith("grindfade-thread-"))) {
      const at = path.join(cache, old);
      if (Date.now() - fs.statSync(at).mtimeMs > 3_600_000) fs.rmSync(at, { recursive: true, force: true });
    }
    const outdir = fs.mkdtempSync(path.join(cache, "grindfade-thread-"));
    // @ts-expect-error -- a plain .mjs build script without types
    const { buildServerBundles } = (await import("../../scripts/server-bundles.mjs")) as { buildServerBundles(outdir: string, entries?: string[]): Promise<Record<string, string>> };
    const built = await buildServerBundles(outdir, ["db/pglite-thread.ts"]);
    return path.resolve(built["db/pglite-thread.ts"]!);
  })();
  return threadScript;
}

/** A fresh PGlite; `thread: true` runs it on a thread of its own, as the production server does. */
export async function freshPglite(options: { thread?: boolean } = {}): Promise<TestDatabase> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-test-"));
  const pgliteDir = path.join(dir, "pglite");
  const thread = options.thread ? { script: await builtThreadScript() } : undefined;
  const handle = await openDatabase({ pgliteDir, pglite: { thread } });
  return {
    ...handle,
    dir: pgliteDir,
    cleanup: async () => {
      await handle.close();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** The server under test, or null when none was given (CI always gives one). */
export function serverUrl(): string | null {
  const url = process.env.TEST_DATABASE_URL;
  if (url) return url;
  if (process.env.CI) {
    throw new Error("TEST_DATABASE_URL is not set: CI must provide a PostgreSQL server for these tests.");
  }
  return null;
}

export async function freshServerDatabase(baseUrl: string): Promise<TestDatabase> {
  const { Client } = await import("pg");
  const name = `grindfade_test_${process.pid}_${Math.random().toString(36).slice(2, 8)}`;
  const admin = new Client({ connectionString: baseUrl });
  await admin.connect();
  await admin.query(`CREATE DATABASE ${name}`);
  await admin.end();
  const url = new URL(baseUrl);
  url.pathname = `/${name}`;
  const handle = await openDatabase({ databaseUrl: url.toString() });
  return {
    ...handle,
    cleanup: async () => {
      await handle.close();
      const c = new Client({ connectionString: baseUrl });
      await c.connect();
      await c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
      await c.end();
    },
  };
}
