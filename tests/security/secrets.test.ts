// No secret is committed: the tracked files carry no keys or signing secrets, no .env file is
// tracked, and the development secret is made on first run, per checkout, and kept after that.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";

const root = process.cwd();

function tracked(): string[] {
  return execFileSync("git", ["ls-files", "-z"], { cwd: root, encoding: "utf8" }).split("\0").filter(Boolean);
}

// Patterns of the secrets this project could leak, named by what they are.
const PATTERNS: [string, RegExp][] = [
  ["a private key block", /-----BEGIN (?:RSA |EC |DSA |OPENSSH |ENCRYPTED )?PRIVATE KEY-----/],
  ["an AWS access key id", /\b(?:AKIA|ASIA)[0-9A-Z]{16}\b/],
  ["an AWS secret access key", /aws_secret_access_key\s*[=:]\s*["']?[A-Za-z0-9/+]{40}/i],
  // As an env line (NEXTAUTH_SECRET=value) or as a quoted value in code (NEXTAUTH_SECRET: "value").
  ["a session signing secret", /NEXTAUTH_SECRET=["']?[A-Za-z0-9+/=_-]{8,}["']?\s*$/m],
  ["a session signing secret in code", /NEXTAUTH_SECRET["']?\s*:\s*["'`][^"'`$]{8,}["'`]/],
  ["a database URL with a password", /postgres(?:ql)?:\/\/[^:/\s"'`]+:[^@\s"'`$<]{3,}@(?!localhost|127\.0\.0\.1)/],
  ["an SMTP URL with a password", /smtps?:\/\/[^:/\s"'`]+:[^@\s"'`$<]{3,}@(?!localhost|127\.0\.0\.1)/],
];

describe("no secret in the repository", () => {
  it("tracks no .env file", () => {
    const envFiles = tracked().filter((f) => /(^|\/)\.env(\.|$)/.test(path.basename(f)) && !f.endsWith(".example"));
    expect(envFiles).toEqual([]);
  });

  it("ignores the file the development secret is written to", () => {
    const out = execFileSync("git", ["check-ignore", ".env.local", ".env"], { cwd: root, encoding: "utf8" });
    expect(out.split("\n")).toEqual(expect.arrayContaining([".env.local", ".env"]));
  });

  it("has no key, token or password in any tracked text file", () => {
    const found: string[] = [];
    for (const file of tracked()) {
      if (file === "package-lock.json") continue;
      const full = path.join(root, file);
      let text: string;
      try {
        const buf = fs.readFileSync(full);
        if (buf.includes(0)) continue; // binary
        text = buf.toString("utf8");
      } catch {
        continue;
      }
      for (const [what, re] of PATTERNS) if (re.test(text)) found.push(`${file}: ${what}`);
    }
    expect(found).toEqual([]);
  });

  it("the scan would catch one (checked on text of its own)", () => {
    // Put together at run time so that this file does not itself hold what the scan looks for.
    const join = (...parts: string[]) => parts.join("");
    const leaks = [
      join("NEXTAUTH_SECRET", "=Zq3kP9vLr2mX8wQe"),
      join("-----BEGIN OPENSSH ", "PRIVATE KEY-----"),
      join("key: AKIA", "ABCDEFGHIJKLMNOP"),
      join("DATABASE_URL=postgres://grind:", "hunter22@db.shop.example/grindfade"),
      join('env: { NEXTAUTH_SECRET: "', 'startup-test-secret-0123456789" }'),
    ];
    for (const leak of leaks) expect(PATTERNS.some(([, re]) => re.test(leak)), leak).toBe(true);
    for (const fine of [
      "export NEXTAUTH_SECRET=$(openssl rand -base64 32)",
      'NEXTAUTH_SECRET: randomBytes(24).toString("base64url")',
      "DATABASE_URL=postgres://grindfade:<password>@db.internal:5432/grindfade",
    ]) {
      expect(PATTERNS.some(([, re]) => re.test(fine)), fine).toBe(false);
    }
  });
});

describe("development secret made on first run", () => {
  const script = path.join(root, "scripts", "ensure-env.mjs");
  const run = (cwd: string) => {
    const env = { ...process.env };
    delete env.NEXTAUTH_SECRET;
    delete env.NEXTAUTH_URL;
    execFileSync(process.execPath, [script], { cwd, env, encoding: "utf8" });
    return fs.readFileSync(path.join(cwd, ".env.local"), "utf8");
  };

  it("writes a random 256-bit secret once and keeps it on later runs", () => {
    const a = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-env-"));
    const b = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-env-"));
    const first = run(a);
    const secret = /^NEXTAUTH_SECRET=(.+)$/m.exec(first)?.[1];
    expect(secret).toBeDefined();
    expect(Buffer.from(secret!, "base64url")).toHaveLength(32);
    expect(run(a)).toBe(first);
    const other = /^NEXTAUTH_SECRET=(.+)$/m.exec(run(b))?.[1];
    expect(other).not.toBe(secret);
  });

  it("leaves a secret the shop set itself alone", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-env-"));
    fs.writeFileSync(path.join(dir, ".env.local"), "NEXTAUTH_SECRET=the-shops-own-value\n");
    expect(run(dir)).toMatch(/^NEXTAUTH_SECRET=the-shops-own-value$/m);
    expect(run(dir).match(/NEXTAUTH_SECRET=/g)).toHaveLength(1);
  });
});
