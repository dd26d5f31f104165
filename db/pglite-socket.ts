// The embedded database served over PostgreSQL's own wire protocol on a Unix socket of its own
// (@electric-sql/pglite-socket), so that the app reaches it with node-postgres exactly as it
// reaches a PostgreSQL server: one driver, the same statements, the same errors. PGlite runs one
// statement at a time, so the app keeps one connection to it (db/client.ts): the socket server can
// take several, but it runs each protocol message of a connection as a turn of its own, and the
// messages of one extended-protocol exchange (Parse, Bind, Execute, Sync) from two connections
// then interleave on PGlite's one session — seen as statements that never answered when writes
// raced a sign-off (tests/review/sign-off-race.test.ts). One connection keeps each exchange whole,
// and node-postgres's pool hands it to one transaction at a time, as PGlite itself would.
//
// Used in the app's own process (development, tests) and on a thread of its own
// (db/pglite-thread.ts, as the production server runs it).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

/** node-postgres finds a Unix socket as `<host>/.s.PGSQL.<port>`. */
export const SOCKET_PORT = 5432;

export interface ServedPglite {
  /** The folder holding the socket: node-postgres's `host`. */
  socketDir: string;
  close(): Promise<void>;
}

/** Opens PGlite on `dir` and serves it on a new socket; a failure to open closes what it opened. */
export async function servePglite(dir: string): Promise<ServedPglite> {
  const { PGlite } = await import("@electric-sql/pglite");
  const { PGLiteSocketServer } = await import("@electric-sql/pglite-socket");
  const client = new PGlite(dir);
  await client.waitReady;
  // A folder only this user can enter (mkdtemp makes it 0700): the socket asks for no password.
  const socketDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-db-"));
  const server = new PGLiteSocketServer({
    db: client,
    path: path.join(socketDir, `.s.PGSQL.${SOCKET_PORT}`),
    // A little headroom over the app's one connection, for a reconnect while the old one closes.
    maxConnections: 4,
  });
  try {
    await server.start();
  } catch (err) {
    await client.close().catch(() => {});
    fs.rmSync(socketDir, { recursive: true, force: true });
    throw err;
  }
  return {
    socketDir,
    close: async () => {
      await server.stop();
      await client.close();
      fs.rmSync(socketDir, { recursive: true, force: true });
    },
  };
}
