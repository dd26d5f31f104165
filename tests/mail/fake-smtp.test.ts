// The local mail catcher: loopback only, shares a port another process already holds, keeps a
// bounded history and optional .eml copies.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import nodemailer from "nodemailer";
import { afterEach, describe, expect, it } from "vitest";
import { startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";

const open: FakeSmtp[] = [];
afterEach(async () => {
  while (open.length) await open.pop()!.close();
});
const start = async (...args: Parameters<typeof startFakeSmtp>) => {
  const s = await startFakeSmtp(...args);
  open.push(s);
  return s;
};
const send = (port: number, subject: string) =>
  nodemailer
    .createTransport({ host: "127.0.0.1", port, secure: false, ignoreTLS: true })
    .sendMail({ from: "a@example.test", to: "b@example.test", subject, text: "hello" });

describe("local mail catcher", () => {
  it("accepts mail on 127.0.0.1 and keeps its raw source", async () => {
    const s = await start({ port: 0, host: "127.0.0.1" });
    expect(s.owned).toBe(true);
    expect(s.port).toBeGreaterThan(0);
    await send(s.port, "First");
    const [m] = s.messages();
    expect(m!.to).toEqual(["b@example.test"]);
    expect(m!.from).toBe("a@example.test");
    expect(m!.raw).toMatch(/^Subject: First$/m);
  });

  it("shares a port that is already taken instead of failing", async () => {
    const first = await start({ port: 0, host: "127.0.0.1" });
    const second = await start({ port: first.port, host: "127.0.0.1" });
    expect(second.owned).toBe(false);
    expect(second.port).toBe(first.port);
    // Mail sent through the second handle reaches the catcher that holds the port.
    await send(second.port, "Through the shared port");
    expect(first.messages().map((m) => /^Subject: (.*)$/m.exec(m.raw)?.[1])).toEqual(["Through the shared port"]);
  });

  it("keeps only the newest messages and writes .eml copies when asked", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-mail-"));
    try {
      const s = await start({ port: 0, host: "127.0.0.1", keep: 2, saveDir: path.join(dir, "mail") });
      for (const subject of ["One", "Two", "Three"]) await send(s.port, subject);
      expect(s.messages().map((m) => /^Subject: (.*)$/m.exec(m.raw)?.[1])).toEqual(["Two", "Three"]);
      const files = fs.readdirSync(path.join(dir, "mail"));
      expect(files).toHaveLength(3);
      expect(files.every((f) => f.endsWith(".eml"))).toBe(true);
      expect(files.map((f) => fs.readFileSync(path.join(dir, "mail", f), "utf8")).join("\n")).toMatch(/^Subject: One$/m);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
