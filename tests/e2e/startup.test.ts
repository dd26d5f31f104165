// The production server refuses to start on a database it cannot use, with one clear line; once
// running, everything it prints is a JSON log line, each line of a request with its request id.
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { randomSecret, serverCommand, startServer as startRunning } from "./server";

function startServer(env: Record<string, string>, cwd = process.cwd()): Promise<{ code: number | null; stderr: string; stdout: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, serverCommand(0), {
      cwd,
      env: { ...process.env, NODE_ENV: "production", NEXTAUTH_SECRET: randomBytes(24).toString("base64url"), ...env },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d) => (stdout += d));
    child.stderr.on("data", (d) => (stderr += d));
    const timer = setTimeout(() => child.kill("SIGKILL"), 60_000);
    child.on("exit", (code) => {
      clearTimeout(timer);
      resolve({ code, stderr, stdout });
    });
  });
}

describe("server start-up", () => {
  it("stops with one line naming DATABASE_URL when the server cannot be reached", async () => {
    const r = await startServer({ DATABASE_URL: "postgres://nobody@127.0.0.1:1/grindfade" });
    expect(r.code).not.toBe(0);
    const lines = r.stderr.split("\n").filter((l) => l.includes("Grindfade cannot start"));
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/DATABASE_URL/);
  });

  it("stops and leaves a foreign data directory untouched", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-foreign-"));
    fs.mkdirSync(path.join(dir, "pglite"));
    fs.writeFileSync(path.join(dir, "pglite", "notes.txt"), "keep me");
    const r = await startServer({ GRINDFADE_DATA_DIR: dir });
    expect(r.code).not.toBe(0);
    expect(r.stderr).toMatch(/GRINDFADE_DATA_DIR.*left untouched/);
    expect(fs.readdirSync(path.join(dir, "pglite"))).toEqual(["notes.txt"]);
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it("says to build first when there is no production build", async () => {
    const empty = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-nobuild-"));
    const r = await startServer({}, empty);
    expect(r.code).toBe(1);
    expect(r.stderr.trim()).toBe("Grindfade cannot start: there is no production build here. Run `npm run build` first.");
    fs.rmSync(empty, { recursive: true, force: true });
  });

  it("prints only JSON log lines, and a refused request's one line carries the id its answer carries", { timeout: 120_000 }, async () => {
    const server = await startRunning(randomSecret(), { GRINDFADE_LOG_LEVEL: "info" });
    try {
      const res = await fetch(`${server.baseURL}/api/seats/00000000-0000-4000-8000-000000000000`, { headers: { "x-request-id": "forged" } });
      expect(res.status).toBeGreaterThanOrEqual(400);
      expect(res.status).toBeLessThan(500);
      const id = res.headers.get("x-request-id")!;
      await fetch(`${server.baseURL}/sign-in`);
      await new Promise((r) => setTimeout(r, 300));
      const lines = server.output().split("\n").filter((l) => l.trim() !== "");
      expect(lines.length).toBeGreaterThan(1);
      for (const line of lines) {
        const parsed = JSON.parse(line) as { level: number; time: string };
        expect(parsed.level, line).toBeGreaterThanOrEqual(10);
        expect(parsed.time, line).toMatch(/^\d{4}-\d{2}-\d{2}T/);
      }
      // At most one line for the refused request, and no stack on it.
      const ofRequest = lines.filter((l) => l.includes(id));
      expect(ofRequest.length).toBeLessThanOrEqual(1);
      for (const l of ofRequest) expect(l).not.toMatch(/"stack"/);
    } finally {
      await server.stop();
    }
  });
});
