// A production build of the app served as `npm start` serves it (server.ts) on a free port with a data directory
// of its own: shared by the end-to-end tests and the bench benchmark.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";

export interface RunningServer {
  baseURL: string;
  dataDir: string;
  /** Stops the server (SIGTERM, then SIGKILL after 10 s) and removes a data directory it made. */
  stop(): Promise<void>;
  /** Sends the signal and resolves once the process has exited; the data directory is kept. */
  kill(signal: NodeJS.Signals): Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  /** Everything the server printed so far (stdout and stderr). */
  output(): string;
}

export interface StartOptions {
  /** Serve this data directory (kept on stop) instead of a fresh one (removed on stop). */
  dataDir?: string;
  /** Run on this PostgreSQL database instead of PGlite. */
  databaseUrl?: string;
}

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const addr = srv.address();
      srv.close(() => (typeof addr === "object" && addr ? resolve(addr.port) : reject(new Error("no port"))));
    });
  });
}

const root = process.cwd();
/** Extra flags for the server's node (BENCH_SERVER_NODE_ARGS, e.g. "--cpu-prof --cpu-prof-dir=/tmp/p"), for profiling. */
function serverNodeArgs(): string[] {
  return (process.env.BENCH_SERVER_NODE_ARGS ?? "").split(/\s+/).filter(Boolean);
}
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");
/** The production server, as `npm start` runs it (server.ts, bundled by `npm run build`). */
export const SERVER_BUNDLE = path.join(root, ".next", "grindfade-server.cjs");

/** `npm start`'s launcher, which runs SERVER_BUNDLE. */
export const START_SCRIPT = path.join(root, "scripts", "start.mjs");

/** The command line of the production server on a port, as `npm start` runs it. */
export function serverCommand(port: number): string[] {
  return [...serverNodeArgs(), START_SCRIPT, "-p", String(port), "-H", "127.0.0.1"];
}

/** `npm run build`: next build, then the server bundle (also made alone when only it is missing). */
export function buildApp(secret: string, force: boolean): void {
  const run = (args: string[], what: string) => {
    const r = spawnSync(process.execPath, args, {
      cwd: root,
      env: { ...process.env, NEXTAUTH_SECRET: secret, NEXT_TELEMETRY_DISABLED: "1" },
      encoding: "utf8",
    });
    if (r.status !== 0) throw new Error(`${what} failed:\n${r.stdout}\n${r.stderr}`);
  };
  if (force || !fs.existsSync(path.join(root, ".next", "BUILD_ID"))) run([nextBin, "build"], "next build");
  if (force || !fs.existsSync(SERVER_BUNDLE)) run([path.join(root, "scripts", "build-server.mjs")], "the server bundle");
}

export async function startServer(
  secret: string,
  extraEnv: Record<string, string> = {},
  options: StartOptions = {},
): Promise<RunningServer> {
  const port = await freePort();
  const baseURL = `http://127.0.0.1:${port}`;
  const ownDataDir = !options.dataDir;
  const dataDir = options.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-e2e-"));
  let output = "";
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: "production",
    NEXTAUTH_URL: baseURL,
    NEXTAUTH_SECRET: secret,
    GRINDFADE_DATA_DIR: dataDir,
    NEXT_TELEMETRY_DISABLED: "1",
    ...extraEnv,
  };
  if (options.databaseUrl) env.DATABASE_URL = options.databaseUrl;
  else delete env.DATABASE_URL;
  const child: ChildProcess = spawn(process.execPath, serverCommand(port), {
    cwd: root,
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout?.on("data", (d) => (output += d));
  child.stderr?.on("data", (d) => (output += d));
  // BENCH_SERVER_LOG=file: a copy of everything the server prints, for looking into a benchmark.
  const logFile = process.env.BENCH_SERVER_LOG;
  if (logFile) {
    child.stdout?.on("data", (d) => fs.appendFileSync(logFile, d));
    child.stderr?.on("data", (d) => fs.appendFileSync(logFile, d));
  }
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    child.once("exit", (code, signal) => resolve({ code, signal })),
  );
  const deadline = Date.now() + 120_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the server exited (${child.exitCode}):\n${output}`);
    try {
      if ((await fetch(`${baseURL}/api/health`)).ok) break;
    } catch {
      /* not up yet */
    }
    if (Date.now() > deadline) {
      child.kill("SIGKILL");
      throw new Error(`the server did not become healthy in time:\n${output}`);
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  const running = () => child.exitCode === null && child.signalCode === null;
  return {
    baseURL,
    dataDir,
    output: () => output,
    kill: async (signal) => {
      if (running()) child.kill(signal);
      return exited;
    },
    stop: async () => {
      if (running()) {
        child.kill("SIGTERM");
        const t = setTimeout(() => child.kill("SIGKILL"), 10_000);
        await exited;
        clearTimeout(t);
      }
      if (ownDataDir) fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export function randomSecret(): string {
  return `e2e-secret-${Math.random().toString(36).slice(2)}-${Date.now().toString(36)}`;
}
