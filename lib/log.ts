// The server's log: one JSON line per event (pino), each line of a request carrying its request
// id. The production server (server.ts) gives every request an id, sends it back in X-Request-Id
// and runs the request inside requestContext, so every line logged while it is answered carries
// the id without being handed it; a 500's answer carries the same id, to find its stack here.
import { AsyncLocalStorage } from "node:async_hooks";
import { randomUUID } from "node:crypto";
import { format } from "node:util";
import pino from "pino";

export const REQUEST_ID_HEADER = "x-request-id";

// One store for the process: server.ts's bundle and Next.js's each hold a copy of this module.
const KEY = Symbol.for("grindfade.log.requestContext");
type GlobalWithContext = typeof globalThis & { [KEY]?: AsyncLocalStorage<{ requestId: string }> };
const g = globalThis as GlobalWithContext;
export const requestContext: AsyncLocalStorage<{ requestId: string }> = (g[KEY] ??= new AsyncLocalStorage());

/** A logger writing to `destination` (stdout by default), each line with the request's id. */
export function makeLogger(level: string, destination?: pino.DestinationStream): pino.Logger {
  const options: pino.LoggerOptions = {
    level,
    base: undefined,
    timestamp: pino.stdTimeFunctions.isoTime,
    mixin: () => {
      const ctx = requestContext.getStore();
      return ctx ? { requestId: ctx.requestId } : {};
    },
  };
  return destination ? pino(options, destination) : pino(options);
}

export const log = makeLogger(process.env.GRINDFADE_LOG_LEVEL ?? (process.env.NODE_ENV === "test" ? "silent" : "info"));
// lib/errors.ts logs through whichever logger registered itself (it must stay free of pino for the browser).
(globalThis as typeof globalThis & { [k: symbol]: unknown })[Symbol.for("grindfade.log.sink")] = log;

export const newRequestId = (): string => randomUUID();

/** A request id as we make them; anything else a client sends is not taken. */
export function requestIdFrom(value: string | string[] | null | undefined): string | undefined {
  const v = Array.isArray(value) ? value[0] : value;
  return v && /^[0-9a-f-]{36}$/.test(v) ? v : undefined;
}

/** The id of the request being answered, when there is one. */
export { currentRequestId } from "@/lib/errors";

const CONSOLE_LEVELS = { error: "error", warn: "warn", info: "info", log: "info", debug: "debug", trace: "trace" } as const;

/**
 * Sends what anything in the process writes to the console (Next.js's own errors and notices
 * among it) through `logger`: one JSON line per call, with the request id when called while a
 * request is answered, an Error's stack under `err` once, and the rest of the arguments as the
 * message. Returns a function that puts the console back.
 */
export function routeConsoleToLog(logger: pino.Logger): () => void {
  const saved = new Map<keyof typeof CONSOLE_LEVELS, (...args: unknown[]) => void>();
  for (const [method, level] of Object.entries(CONSOLE_LEVELS) as Array<[keyof typeof CONSOLE_LEVELS, pino.Level]>) {
    saved.set(method, console[method]);
    console[method] = (...args: unknown[]) => {
      const err = args.find((a): a is Error => a instanceof Error);
      const rest = args.filter((a) => a !== err);
      const msg = rest.length ? format(...rest).trim() : err ? err.message : "";
      if (err) logger[level]({ err }, msg);
      else if (msg) logger[level](msg);
    };
  }
  return () => {
    for (const [method, fn] of saved) console[method] = fn;
  };
}
