// Graceful stop on SIGTERM and SIGINT: take no new database work, let the work in flight finish
// (bounded), close the database so that it needs no recovery at the next start, log one line,
// exit. Under `next start` the framework's own handler for the same signal closes the HTTP server
// and then calls process.exit(); that exit is held until the database is closed.

/** What the stop needs to know about the open database. */
export interface ClosableDatabase {
  kind: string;
  /** True while a query or transaction is running or waiting for its turn. */
  busy(): boolean;
  close(): Promise<void>;
}

export interface ShutdownOptions {
  /** The longest wait for work in flight before the database is closed anyway. */
  drainMs?: number;
  /** The database counts as drained once it has had nothing to do for this long. */
  quietMs?: number;
  /** Called as soon as the signal arrives, before anything else: refuse new work from here on. */
  onStopping?: () => void;
  log?: (line: string) => void;
  /** The process to watch; a stand-in in tests. */
  proc?: ShutdownProcess;
}

export interface ShutdownProcess {
  once(signal: "SIGTERM" | "SIGINT", listener: (signal: NodeJS.Signals) => void): unknown;
  exit: (code?: number) => void;
}

const EXIT_CODES = { SIGTERM: 143, SIGINT: 130 } as const;

export function installGracefulShutdown(
  database: ClosableDatabase,
  options: ShutdownOptions = {},
): void {
  const proc = options.proc ?? (process as unknown as ShutdownProcess);
  const drainMs = options.drainMs ?? 5_000;
  const quietMs = options.quietMs ?? 250;
  const log = options.log ?? ((line: string) => console.log(line));
  let started = false;

  const stop = (signal: "SIGTERM" | "SIGINT") => {
    if (started) return;
    started = true;
    const t0 = Date.now();
    options.onStopping?.();
    const realExit = proc.exit.bind(proc);
    let finishing: Promise<void> | null = null;
    let timer: ReturnType<typeof setInterval> | undefined;

    const finish = (code: number, why: string) => {
      finishing ??= (async () => {
        if (timer) clearInterval(timer);
        let exitCode = code;
        try {
          // PGlite's close() waits for the query or transaction that is running, then writes a
          // shutdown checkpoint; the pool's end() waits for checked-out clients.
          await database.close();
          log(
            `Grindfade stopped on ${signal} (${why}): database (${database.kind}) closed cleanly in ${Date.now() - t0} ms.`,
          );
        } catch (err) {
          exitCode = 1;
          log(
            `Grindfade stopped on ${signal}: the database did not close cleanly (${err instanceof Error ? err.message : String(err)}).`,
          );
        }
        realExit(exitCode);
      })();
    };

    // The HTTP server is closed (every open request answered) when the framework calls exit.
    proc.exit = (code?: number) => finish(code ?? EXIT_CODES[signal], "requests answered");

    // Kept-alive connections hold the HTTP server open for seconds after its last answer, so the
    // database also counts as drained once it has been idle for quietMs, and the wait is bounded.
    let idleSince = database.busy() ? null : t0;
    timer = setInterval(
      () => {
        const now = Date.now();
        if (database.busy()) idleSince = null;
        else idleSince ??= now;
        if (idleSince !== null && now - idleSince >= quietMs)
          finish(EXIT_CODES[signal], "no work in flight");
        else if (now - t0 >= drainMs)
          finish(EXIT_CODES[signal], `work still in flight after ${drainMs} ms`);
      },
      Math.max(10, Math.min(50, quietMs / 5)),
    );
  };

  proc.once("SIGTERM", () => stop("SIGTERM"));
  proc.once("SIGINT", () => stop("SIGINT"));
}
