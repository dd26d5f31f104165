// The production server refuses to start on a database it cannot use, with one clear line.
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { serverCommand } from "./server";

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
});
