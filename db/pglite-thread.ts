// The embedded database on a thread of its own (a worker thread), as the production server runs
// it: PGlite's engine and the stroke save queue (lib/bench/stroke-batch.ts) then run beside
// the thread that answers HTTP, instead of taking turns with it on one core. The app's thread
// reaches it through db/pglite-remote.ts, which drizzle uses as it would PGlite itself.
//
// Built into .next/grindfade-db-thread.cjs by `npm run build` (scripts/server-bundles.mjs).
import { parentPort, workerData } from "node:worker_threads";
import type { PGlite as PGliteClass, Transaction } from "@electric-sql/pglite";
import type { Db } from "./client";
import * as schema from "./schema";
import { sendError, type ThreadAnswer, type ThreadReady, type ThreadRequest } from "./pglite-thread-protocol";
import type { StrokeSave } from "@/lib/bench/stroke-batch";

if (!parentPort) throw new Error("db/pglite-thread.ts runs as a worker thread.");
const port = parentPort;
const { dir } = workerData as { dir: string };

const ROLLBACK = Symbol("rollback");

interface OpenTransaction {
  tx: Transaction;
  finish(commit: boolean): void;
}

async function main(): Promise<void> {
  const { PGlite } = await import("@electric-sql/pglite");
  let client: PGliteClass;
  try {
    client = new PGlite(dir);
    await client.waitReady;
  } catch (err) {
    port.postMessage({ ready: false, error: sendError(err) } satisfies ThreadReady);
    return;
  }
  const { drizzle } = await import("drizzle-orm/pglite");
  const { strokeQueueFor } = await import("@/lib/bench/stroke-batch");
  const db = drizzle({ client, schema }) as unknown as Db;
  // The save queue lives here, beside the database: a batch starts as soon as the one before it
  // ends, with every save that arrived meanwhile, without waiting for the app's thread.
  const strokeQueue = strokeQueueFor(db);

  const transactions = new Map<number, OpenTransaction>();
  // Each open transaction's outcome: settled by "end", or failed to begin.
  const ended = new Map<number, Promise<void>>();
  let nextTx = 1;
  // The parsers that return a type's text as it is, one object per set of types.
  const rawParsers = new Map<string, Record<number, (text: string) => string>>();
  const parsersFor = (types: number[]) => {
    const key = types.join(",");
    let parsers = rawParsers.get(key);
    if (!parsers) {
      parsers = Object.fromEntries(types.map((t) => [t, (text: string) => text]));
      rawParsers.set(key, parsers);
    }
    return parsers;
  };
  const target = (tx: number | undefined) => {
    if (tx === undefined) return client;
    const open = transactions.get(tx);
    if (!open) throw new Error(`Transaction ${tx} is not open.`);
    return open.tx;
  };

  const answer = (id: number, work: () => Promise<unknown>) => {
    work().then(
      (value) => port.postMessage({ id, ok: true, value } satisfies ThreadAnswer),
      (err: unknown) => port.postMessage({ id, ok: false, error: sendError(err) } satisfies ThreadAnswer),
    );
  };

  port.on("message", (m: ThreadRequest) => {
    switch (m.op) {
      case "query":
        answer(m.id, () => target(m.tx).query(m.sql, m.params, { rowMode: m.rowMode, parsers: parsersFor(m.rawTypes) }));
        return;
      case "exec":
        answer(m.id, () => target(m.tx).exec(m.sql));
        return;
      case "begin": {
        // Answered once the transaction holds the database; its end is answered by "end".
        const txId = nextTx++;
        const done = client.transaction(
          (tx) =>
            new Promise<void>((resolve, reject) => {
              transactions.set(txId, { tx, finish: (commit) => (commit ? resolve() : reject(ROLLBACK)) });
              port.postMessage({ id: m.id, ok: true, value: txId } satisfies ThreadAnswer);
            }),
        );
        // A transaction that failed to begin answers "begin" with the error.
        ended.set(txId, done);
        done.catch((err: unknown) => {
          if (!transactions.has(txId) && err !== ROLLBACK) {
            port.postMessage({ id: m.id, ok: false, error: sendError(err) } satisfies ThreadAnswer);
          }
        });
        return;
      }
      case "end":
        answer(m.id, async () => {
          const open = transactions.get(m.tx);
          const done = ended.get(m.tx);
          if (!open || !done) throw new Error(`Transaction ${m.tx} is not open.`);
          open.finish(m.commit);
          try {
            await done;
          } catch (err) {
            if (err !== ROLLBACK) throw err;
          } finally {
            transactions.delete(m.tx);
            ended.delete(m.tx);
          }
          return null;
        });
        return;
      case "strokes":
        answer(m.id, () => strokeQueue.submit(m.save as StrokeSave));
        return;
      case "close":
        answer(m.id, async () => {
          await client.close();
          return null;
        });
        return;
    }
  });
  port.postMessage({ ready: true } satisfies ThreadReady);
}

void main();
