// The embedded database on a thread of its own (a worker thread), as the production server runs
// it: PGlite's engine then runs beside the thread that answers HTTP instead of taking turns with
// it on one core. It serves PostgreSQL's wire protocol on a Unix socket (db/pglite-socket.ts),
// and the app's thread reaches it with node-postgres, as it reaches a PostgreSQL server.
//
// Messages: the thread answers { ready: true, socketDir } or { ready: false, error }; "close"
// closes the database and answers { closed: true }.
//
// Built into .next/grindfade-db-thread.cjs by `npm run build` (scripts/server-bundles.mjs).
import { parentPort, workerData } from "node:worker_threads";
import { servePglite } from "./pglite-socket";

if (!parentPort) throw new Error("db/pglite-thread.ts runs as a worker thread.");
const port = parentPort;
const { dir } = workerData as { dir: string };

void (async () => {
  let served: Awaited<ReturnType<typeof servePglite>>;
  try {
    served = await servePglite(dir);
  } catch (err) {
    port.postMessage({ ready: false, error: err instanceof Error ? err.message : String(err) });
    return;
  }
  port.on("message", (m: unknown) => {
    if (m !== "close") return;
    void served.close().then(
      () => port.postMessage({ closed: true }),
      (err: unknown) => port.postMessage({ closed: false, error: err instanceof Error ? err.message : String(err) }),
    );
  });
  port.postMessage({ ready: true, socketDir: served.socketDir });
})();
