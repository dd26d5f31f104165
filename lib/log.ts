// The server's log: one JSON line per event (pino), each line of a request carrying its request
// id. The production server (server.ts) gives every request an id, sends it back in X-Request-Id
// and runs the request inside requestContext, so every line logged while it is answered carries
// the id without being handed it; a 500's answer carries the same id, to find its stack here.
import { AsyncLocalStorage } from "node:async_hooks";
import { randomUUID } from "node:crypto";
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
