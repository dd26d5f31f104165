// A local SMTP server for development and tests: accepts every message, keeps the raw source in
// memory (and optionally as .eml files) so that mail can be checked without a real mail account.
import fs from "node:fs";
import path from "node:path";
import { SMTPServer } from "smtp-server";

export interface FakeMessage {
  from: string | null;
  to: string[];
  raw: string;
  receivedAt: Date;
}

export interface FakeSmtp {
  port: number;
  /** False when another process already held the port and we are only pointing at it. */
  owned: boolean;
  messages(): FakeMessage[];
  close(): Promise<void>;
}

export interface FakeSmtpOptions {
  port: number;
  /** Only loopback: the fake accepts anything and must never be reachable from the network. */
  host?: "127.0.0.1";
  /** When set, each message is also written here as an .eml file. */
  saveDir?: string;
  /** How many messages to keep in memory; older ones are dropped so a long dev session stays small. */
  keep?: number;
}

export async function startFakeSmtp(opts: FakeSmtpOptions): Promise<FakeSmtp> {
  const host = opts.host ?? "127.0.0.1";
  const keep = opts.keep ?? 200;
  const store: FakeMessage[] = [];

  const server = new SMTPServer({
    secure: false,
    disabledCommands: ["STARTTLS"],
    authOptional: true,
    // Any user name and password is accepted, so a transport configured with credentials works too.
    onAuth(_auth, _session, callback) {
      callback(null, { user: "grindfade" });
    },
    logger: false,
    banner: "Grindfade local mail catcher",
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", (err) => callback(err));
      stream.on("end", () => {
        const message: FakeMessage = {
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
          to: session.envelope.rcptTo.map((r) => r.address),
          raw: Buffer.concat(chunks).toString("utf8"),
          receivedAt: new Date(),
        };
        store.push(message);
        if (store.length > keep) store.splice(0, store.length - keep);
        if (opts.saveDir) {
          try {
            fs.mkdirSync(opts.saveDir, { recursive: true });
            const name = `${message.receivedAt.toISOString().replace(/[:.]/g, "-")}-${session.id}.eml`;
            fs.writeFileSync(path.join(opts.saveDir, name), message.raw);
          } catch (err) {
            // A full disk must not bounce the message: the in-memory copy is enough to go on.
            console.warn(`Local mail catcher could not save a copy: ${String(err)}`);
          }
        }
        callback();
      });
    },
  });

  const port = await new Promise<number | null>((resolve, reject) => {
    const onError = (err: NodeJS.ErrnoException) => {
      if (err.code === "EADDRINUSE") resolve(null);
      else reject(err);
    };
    server.once("error", onError);
    server.listen(opts.port, host, () => {
      server.off("error", onError);
      const addr = server.server.address();
      resolve(typeof addr === "object" && addr ? addr.port : opts.port);
    });
  });

  if (port === null) {
    // Another dev server (or an earlier start in this process) already runs a catcher on this
    // port; mail sent there is caught just the same, so share it rather than fail.
    return { port: opts.port, owned: false, messages: () => [], close: async () => {} };
  }

  // Keep errors after start-up (a client resetting its connection) from crashing the process.
  server.on("error", (err) => console.warn(`Local mail catcher: ${err.message}`));
  return {
    port,
    owned: true,
    messages: () => [...store],
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
