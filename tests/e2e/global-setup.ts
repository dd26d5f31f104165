// Builds the app for production and serves it with `next start` on a free port, with its own
// temporary data directory, for the end-to-end tests. E2E_SKIP_BUILD=1 reuses an existing build.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";

declare module "vitest" {
  export interface ProvidedContext {
    baseURL: string;
    dataDir: string;
  }
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const addr = srv.address();
      srv.close(() => (typeof addr === "object" && addr ? resolve(addr.port) : reject(new Error("no port"))));
    });
  });
}

async function waitForHealth(url: string, child: ChildProcess, log: () => string): Promise<void> {
  const deadline = Date.now() + 120_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`next start exited (${child.exitCode}):\n${log()}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`next start did not become healthy in time:\n${log()}`);
}

let server: ChildProcess | undefined;
let dataDir: string | undefined;

export async function setup(project: TestProject) {
  const root = process.cwd();
  const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");
  const secret = "e2e-secret-" + Math.random().toString(36).slice(2) + "-padding";
  if (process.env.E2E_SKIP_BUILD !== "1" || !fs.existsSync(path.join(root, ".next", "BUILD_ID"))) {
    const build = spawnSync(process.execPath, [nextBin, "build"], {
      cwd: root,
      env: { ...process.env, NEXTAUTH_SECRET: secret, NEXT_TELEMETRY_DISABLED: "1" },
      encoding: "utf8",
    });
    if (build.status !== 0) throw new Error(`next build failed:\n${build.stdout}\n${build.stderr}`);
  }
  const port = await freePort();
  const baseURL = `http://127.0.0.1:${port}`;
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-e2e-"));
  let output = "";
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: "production",
    NEXTAUTH_URL: baseURL,
    NEXTAUTH_SECRET: secret,
    GRINDFADE_DATA_DIR: dataDir,
    GRINDFADE_SIGNIN_MAX_FAILURES: "3",
    NEXT_TELEMETRY_DISABLED: "1",
  };
  delete env.DATABASE_URL;
  server = spawn(process.execPath, [nextBin, "start", "-p", String(port), "-H", "127.0.0.1"], {
    cwd: root,
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  server.stdout?.on("data", (d) => (output += d));
  server.stderr?.on("data", (d) => (output += d));
  await waitForHealth(baseURL, server, () => output);
  project.provide("baseURL", baseURL);
  project.provide("dataDir", dataDir);
}

export async function teardown() {
  if (server && server.exitCode === null) {
    server.kill("SIGTERM");
    await new Promise((r) => {
      const t = setTimeout(() => {
        server?.kill("SIGKILL");
        r(null);
      }, 5000);
      server?.once("exit", () => {
        clearTimeout(t);
        r(null);
      });
    });
  }
  if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
}
