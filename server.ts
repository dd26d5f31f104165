// The production server (`npm start`): Next.js's own request handler for every request, behind a
// thin gate of ours — a request id on every request and log line, methods nothing of ours serves
// refused with 405 (Next.js cannot even read a TRACE), and the caller's address stamped for the
// sign-in throttle. `npm run dev` runs this same file with `--dev` (through tsx), so development
// gets the same gate, request ids and log lines.
//
// Built into .next/grindfade-server.cjs by `npm run build` (scripts/server-bundles.mjs).
import http from "node:http";
import path from "node:path";
import { parseArgs } from "node:util";

const { values: args } = parseArgs({
  options: { port: { type: "string", short: "p" }, hostname: { type: "string", short: "H" }, dev: { type: "boolean" } },
  strict: false,
});
const port = Number(args.port ?? process.env.PORT ?? 3000);
const hostname = String(args.hostname ?? process.env.HOSTNAME ?? "0.0.0.0");

async function main(): Promise<void> {
  const env = process.env as Record<string, string | undefined>;
  const dev = args.dev === true;
  env.NODE_ENV ??= dev ? "development" : "production";
  // PGlite on a thread of its own, built beside this file: the database's work then runs on the
  // second core instead of taking turns with HTTP on this one. GRINDFADE_DB_THREAD=off keeps it
  // here, as development does (there is no built thread to start).
  env.GRINDFADE_DB_THREAD ??= dev ? "off" : path.join(__dirname, "grindfade-db-thread.cjs");
  // Everything written to the console from here on (Next.js's own errors and notices among it)
  // becomes a log line, with the request's id while a request is answered.
  // Next.js's process set-up first (its AsyncLocalStorage, which lib/log's imports expect), as
  // its own command line does before anything else.
  await import("next/dist/server/node-environment.js");
  const { default: next } = await import("next");
  const { log, newRequestId, REQUEST_ID_HEADER, requestContext, routeConsoleToLog } = await import("@/lib/log");
  routeConsoleToLog(log);
  const app = dev ? next({ dev: true, turbopack: true, hostname, port, dir: process.cwd() }) : next({ dev: false, hostname, port, dir: process.cwd() });
  const handle = app.getRequestHandler();
  // Runs instrumentation.ts: the database is opened (or the start refused) before we listen.
  await app.prepare();
  const { COMMON_HEADERS, API_POLICY } = await import("@/lib/security/headers");
  const { isServedMethod, METHOD_REFUSAL, SERVED_METHODS } = await import("@/lib/security/request-gate");
  const { ADDRESS_HEADER, clientAddress, stampAddress } = await import("@/lib/auth/throttle");
  const { serverEnv } = await import("@/lib/env");
  const { randomBytes } = await import("node:crypto");
  const trustedProxies = serverEnv().GRINDFADE_TRUSTED_PROXIES;

  const server = http.createServer((req, res) => {
    // Every request gets an id of ours (a client's is not taken), sent back and on every log line.
    const requestId = newRequestId();
    req.headers[REQUEST_ID_HEADER] = requestId;
    res.setHeader("X-Request-Id", requestId);
    requestContext.run({ requestId }, () => serve(req, res));
  });

  function serve(req: http.IncomingMessage, res: http.ServerResponse): void {
    // Next.js cannot even read a TRACE request (a 500); nothing of ours answers these methods.
    if (!isServedMethod(req.method)) {
      req.resume();
      const body = JSON.stringify(METHOD_REFUSAL);
      for (const [key, value] of Object.entries(COMMON_HEADERS)) res.setHeader(key, value);
      res.writeHead(405, { "Content-Type": "application/json", "Content-Security-Policy": API_POLICY, Allow: SERVED_METHODS.join(", "), "Content-Length": Buffer.byteLength(body) });
      res.end(body);
      return;
    }
    // Who is asking, for the sign-in throttle: from the connection, or the trusted proxies' header.
    req.headers[ADDRESS_HEADER] = stampAddress(clientAddress(req.headers, req.socket.remoteAddress, trustedProxies), () => randomBytes(18).toString("base64url"));
    void handle(req, res);
  }
  server.keepAliveTimeout = 5_000;

  // As `next start` does: stop taking connections, then exit. The database's own handler
  // (db/shutdown.ts) holds the exit until the database is closed.
  for (const signal of ["SIGTERM", "SIGINT"] as const) {
    process.once(signal, () => {
      server.close(() => process.exit(signal === "SIGTERM" ? 143 : 130));
      server.closeIdleConnections();
    });
  }

  server.listen(port, hostname, () => {
    log.info({ port, hostname, dev }, `Grindfade listening on http://${hostname}:${port}`);
  });
}

void main().catch((err: unknown) => {
  // Plainly on stderr, not as a log line: this is what the person starting the server reads.
  process.stderr.write(`Grindfade cannot start: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
