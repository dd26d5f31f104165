// The graceful stop: new work refused at once, work in flight finished, the framework's exit held
// until the database is closed, the database closed cleanly (pg_control says "shut down").
import { EventEmitter } from "node:events";
import fs from "node:fs";
import path from "node:path";
import { sql } from "drizzle-orm";
import { afterEach, describe, expect, it } from "vitest";
import {
  installGracefulShutdown,
  type ClosableDatabase,
  type ShutdownProcess,
} from "@/db/shutdown";
import { openDatabase } from "@/db/client";
import { clusterState } from "../helpers/pg-control";
import { freshPglite, freshServerDatabase, serverUrl, type TestDatabase } from "../helpers/db";

class FakeProcess extends EventEmitter implements ShutdownProcess {
  exits: number[] = [];
  exited: Promise<number>;
  private resolveExit!: (code: number) => void;
  constructor() {
    super();
    this.exited = new Promise((r) => (this.resolveExit = r));
  }
  exit = (code?: number) => {
    this.exits.push(code ?? 0);
    this.resolveExit(code ?? 0);
  };
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

let open: TestDatabase | null = null;
afterEach(() => {
  // The stop closed the database already; only its directory is left to remove.
  if (open?.dir) fs.rmSync(path.dirname(open.dir), { recursive: true, force: true });
  open = null;
});

describe("graceful stop", () => {
  it("lets a running transaction commit, then closes PGlite cleanly and exits with 143", async () => {
    open = await freshPglite();
    const { db, dir } = open;
    await db.execute(sql`create table shutdown_probe (n int)`);
    const proc = new FakeProcess();
    const lines: string[] = [];
    let stopping = false;
    installGracefulShutdown(open, {
      proc,
      quietMs: 50,
      drainMs: 5000,
      log: (l) => lines.push(l),
      onStopping: () => (stopping = true),
    });

    expect(open.busy()).toBe(false);
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    const tx = db.transaction(async (t) => {
      await t.execute(sql`insert into shutdown_probe values (1)`);
      await gate;
      await t.execute(sql`insert into shutdown_probe values (2)`);
    });
    await sleep(20);
    expect(open.busy()).toBe(true);

    proc.emit("SIGTERM", "SIGTERM");
    expect(stopping).toBe(true);
    await sleep(200);
    expect(proc.exits).toEqual([]); // still waiting for the transaction
    release();
    await tx;
    expect(await proc.exited).toBe(143);
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/stopped on SIGTERM \(no work in flight\).*closed cleanly/);
    expect(clusterState(dir!)).toBe("shut down");

    const again = await openDatabase({ pgliteDir: dir! });
    const rows = await again.db.execute(sql`select count(*)::int as n from shutdown_probe`);
    expect((rows as unknown as { rows: Array<{ n: number }> }).rows[0]!.n).toBe(2);
    await again.close();
  });

  it("holds the framework's own exit until the database is closed", async () => {
    const proc = new FakeProcess();
    const order: string[] = [];
    let finishClose!: () => void;
    const database: ClosableDatabase = {
      kind: "stand-in",
      busy: () => true,
      close: () => {
        order.push("close started");
        return new Promise<void>((r) => (finishClose = r)).then(
          () => void order.push("close finished"),
        );
      },
    };
    installGracefulShutdown(database, {
      proc,
      quietMs: 50,
      drainMs: 5000,
      log: (l) => order.push(l),
    });
    proc.emit("SIGTERM", "SIGTERM");
    // What `next start` does once its HTTP server has answered every request:
    proc.exit(143);
    await sleep(20);
    expect(order).toEqual(["close started"]);
    expect(proc.exits).toEqual([]);
    finishClose();
    expect(await proc.exited).toBe(143);
    expect(order[1]).toBe("close finished");
    expect(order[2]).toMatch(/stopped on SIGTERM \(requests answered\)/);
  });

  it("closes anyway once the bound is reached, and SIGINT exits with 130", async () => {
    const proc = new FakeProcess();
    const lines: string[] = [];
    let closedAt = 0;
    const t0 = Date.now();
    installGracefulShutdown(
      { kind: "stand-in", busy: () => true, close: async () => void (closedAt = Date.now()) },
      { proc, quietMs: 50, drainMs: 300, log: (l) => lines.push(l) },
    );
    proc.emit("SIGINT", "SIGINT");
    expect(await proc.exited).toBe(130);
    expect(closedAt - t0).toBeGreaterThanOrEqual(290);
    expect(lines[0]).toMatch(/still in flight after 300 ms/);
  });

  it("exits non-zero when the database cannot close", async () => {
    const proc = new FakeProcess();
    const lines: string[] = [];
    installGracefulShutdown(
      { kind: "stand-in", busy: () => false, close: () => Promise.reject(new Error("disk gone")) },
      { proc, quietMs: 20, log: (l) => lines.push(l) },
    );
    proc.emit("SIGTERM", "SIGTERM");
    expect(await proc.exited).toBe(1);
    expect(lines[0]).toMatch(/did not close cleanly \(disk gone\)/);
  });

  it.skipIf(!serverUrl())(
    "on a PostgreSQL server, a transaction counts as work in flight until it ends",
    async () => {
      const t = await freshServerDatabase(serverUrl()!);
      try {
        expect(t.busy()).toBe(false);
        let release!: () => void;
        const gate = new Promise<void>((r) => (release = r));
        const tx = t.db.transaction(async (x) => {
          await x.execute(sql`select 1`);
          await gate;
        });
        await sleep(50);
        expect(t.busy()).toBe(true);
        release();
        await tx;
        expect(t.busy()).toBe(false);
      } finally {
        await t.cleanup();
      }
    },
  );
});
