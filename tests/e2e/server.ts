// A production build of the app served by `next start` on a free port with a data directory
// of its own: shared by the end-to-end tests and the bench benchmark.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";

export interface RunningServer {
  baseURL: string;
  dataDir: string;
  stop(): Promise<void>;
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
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");

export function buildApp(secret: string, force: boolean): void {
  if (!force && fs.existsSync(path.join(root, ".next", "BUILD_ID"))) return;
  const build = spawnSync(process.execPath, [nextBin, "build"], {
    cwd: root,
    env: { ...process.env, NEXTAUTH_SECRET: secret, NEXT_TELEMETRY_DISABLED: "1" },
    encoding: "utf8",
  });
  if (build.status !== 0) throw new Error(`next build failed:\n${build.stdout}\n${build.stderr}`);
}

export async function startServer(secret: string, extraEnv: Record<string, string> = {}): Promise<RunningServer> {
  const port = await freePort();
  const baseURL = `http://127.0.0.1:${port}`;
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-e2e-"));
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
  delete env.DATABASE_URL;
  const child: ChildProcess = spawn(process.execPath, [nextBin, "start", "-p", String(port), "-H", "127.0.0.1"], {
    cwd: root,
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout?.on("data", (d) => (output += d));
  child.stderr?.on("data", (d) => (output += d));
  const deadline = Date.now() + 120_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`next start exited (${child.exitCode}):\n${output}`);
    try {
      if ((await fetch(`${baseURL}/api/health`)).ok) break;
    } catch {
      /* not up yet */
    }
    if (Date.now() > deadline) throw new Error(`next start did not become healthy in time:\n${output}`);
    await new Promise((r) => setTimeout(r, 250));
  }
  return {
    baseURL,
    dataDir,
    stop: async () => {
      if (child.exitCode === null) {
        child.kill("SIGTERM");
        await new Promise((r) => {
          const t = setTimeout(() => {
            child.kill("SIGKILL");
            r(null);
          }, 5000);
          child.once("exit", () => {
            clearTimeout(t);
            r(null);
          });
        });
      }
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export function randomSecret(): string {
  return `e2e-secret-${Math.random().toString(36).slice(2)}-${Date.now().toString(36)}`;
}
