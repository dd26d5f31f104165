// Server start-up: open the database, apply migrations and seed the demo shop before the first
// request, then start the mail worker; stop the process with one clear line if the database
// cannot be used.
import { getDatabase, getDb } from "@/db/client";
import { startMailWorker } from "@/lib/mail/worker";

export async function startServer(): Promise<void> {
  try {
    const { kind } = await getDatabase();
    console.log(`Grindfade database ready (${kind}).`);
    // Tests shorten the worker's pause between passes; 30 s is plenty for a shop.
    const intervalMs = Number(process.env.GRINDFADE_MAIL_INTERVAL_MS) || 30_000;
    startMailWorker(getDb, Math.max(250, intervalMs));
  } catch (err) {
    console.error(`Grindfade cannot start: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  }
}
