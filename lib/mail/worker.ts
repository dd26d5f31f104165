// The background sender: every interval it sends whatever is due in the outbox. Started once from
// the server start-up; it must never stop the process, whatever the database or mail server does.
import type { Db } from "@/db/client";
import { mailConfig } from "./config";
import { processDueMail } from "./outbox";
import { createTransport } from "./transport";

export interface MailWorker {
  /** One pass now (also what each tick runs); resolves when it is done, never rejects. */
  runOnce(): Promise<void>;
  stop(): void;
}

export function startMailWorker(getDb: () => Promise<Db>, intervalMs = 30_000): MailWorker {
  let running: Promise<void> | null = null;
  let warnedNoServer = false;

  const pass = async () => {
    try {
      const config = mailConfig();
      const transport = await createTransport(config);
      if (!transport) {
        if (!warnedNoServer) {
          console.warn("Mail is queued but not sent: set SMTP_URL to the shop's mail server.");
          warnedNoServer = true;
        }
        return;
      }
      const db = await getDb();
      const result = await processDueMail(db, transport, new Date(), { from: config.from });
      transport.close();
      if (result.failed > 0) console.warn(`Mail: ${result.failed} message(s) gave up after repeated failures.`);
    } catch (err) {
      console.warn(`Mail worker: ${err instanceof Error ? err.message : String(err)}; trying again later.`);
    }
  };

  // Never two passes at once in one process: a slow send must not be overtaken by the next tick.
  const runOnce = () => {
    if (!running) running = pass().finally(() => (running = null));
    return running;
  };

  const timer = setInterval(() => void runOnce(), intervalMs);
  // The worker alone must not keep the process alive (tests, scripts, a shutting-down server).
  timer.unref();
  void runOnce();
  return { runOnce, stop: () => clearInterval(timer) };
}
