// Opening a database refuses what it must not touch and names the variable to fix.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { checkPgliteDirectory, openDatabase } from "@/db/client";
import { DatabaseStartError } from "@/lib/errors";

function tmp(): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-client-"));
}

describe("PGlite data directory checks", () => {
  it("accepts a missing or empty directory as new", () => {
    const dir = tmp();
    expect(checkPgliteDirectory(path.join(dir, "nope"))).toBe("new");
    expect(checkPgliteDirectory(dir)).toBe("new");
  });

  it("refuses a foreign directory and leaves its files untouched", async () => {
    const dir = tmp();
    fs.writeFileSync(path.join(dir, "invoices.txt"), "not a database");
    await expect(openDatabase({ pgliteDir: dir })).rejects.toThrow(/GRINDFADE_DATA_DIR.*holds no database/);
    expect(fs.readdirSync(dir)).toEqual(["invoices.txt"]);
    expect(fs.readFileSync(path.join(dir, "invoices.txt"), "utf8")).toBe("not a database");
  });

  it("refuses a database of another PostgreSQL major version", () => {
    const dir = tmp();
    fs.writeFileSync(path.join(dir, "PG_VERSION"), "17\n");
    expect(() => checkPgliteDirectory(dir)).toThrow(/PostgreSQL 17.*needs 18/);
  });

  it("refuses a file where a directory should be", () => {
    const file = path.join(tmp(), "file");
    fs.writeFileSync(file, "x");
    expect(() => checkPgliteDirectory(file)).toThrow(DatabaseStartError);
  });

  it("reports a damaged cluster with what to do, without rewriting it", async () => {
    const dir = tmp();
    fs.writeFileSync(path.join(dir, "PG_VERSION"), "18\n");
    fs.mkdirSync(path.join(dir, "global"));
    fs.writeFileSync(path.join(dir, "global", "pg_control"), "garbage");
    const before = fs.readdirSync(dir).sort();
    await expect(openDatabase({ pgliteDir: dir })).rejects.toThrow(/could not be opened.*left untouched/s);
    expect(fs.readdirSync(dir).sort()).toEqual(before);
    expect(fs.readFileSync(path.join(dir, "global", "pg_control"), "utf8")).toBe("garbage");
  });
});

describe("DATABASE_URL", () => {
  it("an unreachable server fails with one line naming the variable", async () => {
    // Port 1 on loopback: nothing listens there.
    const err = await openDatabase({ databaseUrl: "postgres://nobody@127.0.0.1:1/none" }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(DatabaseStartError);
    const message = (err as Error).message;
    expect(message).toMatch(/^DATABASE_URL: /);
    expect(message).not.toContain("\n");
  });
});
