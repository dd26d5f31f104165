// Server start-up: open the database, apply migrations and seed the demo shop before the first
// request, then start the mail worker; stop the process with one clear line if the database
// cannot be used. The graceful stop on SIGTERM/SIGINT is db/shutdown.ts, installed with the
// database.
import { getDatabase, getDb } from "@/db/client";
import { startMailWorker } from "@/lib/mail/worker";
// The structured logger (it registers itself for lib/errors.ts on load).
import { log } from "@/lib/log";

export async function startServer(): Promise<void> {
  try {
    const { kind, onThread } = await getDatabase();
    log.info({ database: kind, onThread }, `Grindfade database ready (${kind}${onThread ? ", on its own thread" : ""}).`);
    // Tests shorten the worker's pause between passes; 30 s is plenty for a shop.
    const intervalMs = Number(process.env.GRINDFADE_MAIL_INTERVAL_MS) || 30_000;
    const worker = startMailWorker(getDb, Math.max(250, intervalMs));
    // No new mail pass once the server is stopping; a pass already running finishes.
    process.once("SIGTERM", () => worker.stop());
    process.once("SIGINT", () => worker.stop());
  } catch (err) {
    // Plainly on stderr (the server sends the console to the log): the person starting it reads this.
    process.stderr.write(`Grindfade cannot start: ${err instanceof Error ? err.message : String(err)}\n`);
    process.exit(1);
  }
}
