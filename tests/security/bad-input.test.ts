// The bad-input corpus (./bad-input-corpus.ts) against the real route handlers and server
// actions: every malformed request gets the 4xx it deserves with a sentence saying why, never a
// server error, and leaves every table and the storage directory exactly as they were. The audit
// trail is one of those tables, so a refusal appends nothing to it either.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

// Storage reads its directory on first use; this file gets one of its own.
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-bad-input-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { eq, sql } = await import("drizzle-orm");
const { users: usersTable } = await import("@/db/schema");
const { recordAudit } = await import("@/lib/audit");
const { freshPglite, freshServerDatabase, serverUrl } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const { resetBlobStore } = await import("@/lib/storage");
const { buildFixtures, databasePrint, storagePrint } = await import("./bad-input-fixtures");
const { actionCases, routeCases } = await import("./bad-input-corpus");
type Fixtures = import("./bad-input-fixtures").Fixtures;

/** What actionFailure answers for an error it did not expect: the action's equivalent of a 500. */
const UNEXPECTED_ACTION_FAILURE = "The change could not be saved. Nothing was changed; try again.";

const server = serverUrl();
const backends: Array<[string, () => Promise<TestDatabase>]> = [["PGlite", freshPglite]];
if (server) backends.push(["PostgreSQL server", () => freshServerDatabase(server)]);
else console.warn("TEST_DATABASE_URL not set: the bad-input corpus runs on PGlite only (CI runs both).");

afterAll(() => {
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe("the corpus", () => {
  it("holds at least 50 distinct malformed requests", () => {
    const names = [...routeCases, ...actionCases].map((c) => `${c.group}: ${c.name}`);
    expect(new Set(names).size).toBe(names.length);
    expect(names.length).toBeGreaterThanOrEqual(50);
    expect(routeCases.every((c) => c.status >= 400 && c.status < 500)).toBe(true);
  });

  it("sends something to every route handler that reads input", () => {
    const apiDir = path.join(process.cwd(), "app/api");
    const routes: string[] = [];
    const walk = (d: string) => {
      for (const e of fs.readdirSync(d, { withFileTypes: true })) {
        if (e.isDirectory()) walk(path.join(d, e.name));
        else if (e.name === "route.ts") routes.push(path.relative(process.cwd(), path.join(d, e.name)).replace(/\.ts$/, ""));
      }
    };
    walk(apiDir);
    const corpus = fs.readFileSync(path.join(import.meta.dirname, "bad-input-corpus.ts"), "utf8");
    const imported = new Set([...corpus.matchAll(/from "@\/(app\/api\/[^"]+\/route)"/g)].map((m) => m[1]));
    // The health check reads nothing from the request; sign-in is tried through the check next-auth calls.
    const notHere = new Set(["app/api/health/route", "app/api/auth/[...nextauth]/route"]);
    expect(routes.filter((r) => !notHere.has(r) && !imported.has(r))).toEqual([]);
    expect(actionCases.some((c) => c.group === "sign-in")).toBe(true);
  });
});

describe.each(backends)("bad input on %s", (_name, open) => {
  let f: Fixtures;
  let users: Map<string, string>;
  const errors = vi.spyOn(console, "error");

  beforeAll(async () => {
    resetServerEnvCache();
    resetBlobStore();
    state.t = await open();
    await seedDemoShop(state.t.db);
    f = await buildFixtures(state.t.db);
    users = f.users;
  });
  afterAll(async () => {
    await state.t?.cleanup();
    state.t = null;
  });
  beforeEach(() => {
    errors.mockClear();
  });
  afterEach(() => {
    state.session = null;
  });

  const signInAs = (email: string | null) => {
    state.session = email ? { user: { id: users.get(email)! } } : null;
  };
  const prints = async () => ({ tables: await databasePrint(state.t!.db), files: storagePrint(dataDir) });

  it("the fingerprints notice a changed row, an appended audit entry and a new file", async () => {
    const db = state.t!.db;
    const before = await prints();
    await db
      .update(usersTable)
      .set({ updatedAt: sql`${usersTable.updatedAt} + interval '1 second'` })
      .where(eq(usersTable.email, "wren@ferrule.example"));
    const touched = await prints();
    expect(touched.tables.users!.rows).toBe(before.tables.users!.rows);
    expect(touched.tables.users!.md5).not.toBe(before.tables.users!.md5);
    await recordAudit(db, { actorId: null, action: "test.fingerprint", entityType: "test", entityId: "fingerprint" });
    const appended = await prints();
    expect(appended.tables.audit_entries!.rows).toBe(before.tables.audit_entries!.rows + 1);
    const stray = path.join(dataDir, "blobs", "photos", "stray.part-1");
    fs.mkdirSync(path.dirname(stray), { recursive: true });
    fs.writeFileSync(stray, "x");
    try {
      expect((await prints()).files).toEqual({ ...before.files, [path.relative(dataDir, stray)]: 1 });
    } finally {
      fs.rmSync(stray);
    }
    // Every table of the schema is in the print, the audit trail among them.
    expect(Object.keys(before.tables)).toEqual(expect.arrayContaining(["audit_entries", "jobs", "lapping_sessions", "seat_photos", "strokes", "users"]));
    expect(Object.keys(before.tables).length).toBeGreaterThanOrEqual(20);
  });

  describe.each([...new Set(routeCases.map((c) => c.group))])("%s", (group) => {
    it.each(routeCases.filter((c) => c.group === group).map((c) => [`${c.name} → ${c.status}`, c] as const))("%s", async (_label, c) => {
      signInAs(c.as);
      const before = await prints();
      const res = await c.send(f);
      const text = await res.text();
      expect(res.status, text).toBe(c.status);
      expect(res.headers.get("content-type")).toMatch(/^application\/json/);
      const body = JSON.parse(text) as { error?: unknown; message?: unknown };
      expect(typeof body.error).toBe("string");
      expect(typeof body.message).toBe("string");
      expect((body.message as string).length).toBeGreaterThan(10);
      if (c.message) expect(body.message).toMatch(c.message);
      expect(errors).not.toHaveBeenCalled();
      expect(await prints()).toEqual(before);
    });
  });

  describe.each([...new Set(actionCases.map((c) => c.group))])("%s", (group) => {
    it.each(actionCases.filter((c) => c.group === group).map((c) => [c.name, c] as const))("%s", async (_label, c) => {
      signInAs(c.as);
      const before = await prints();
      const res = await c.run(f);
      expect(res.ok, JSON.stringify(res).slice(0, 500)).toBe(false);
      expect(typeof res.message).toBe("string");
      expect(res.message!.length).toBeGreaterThan(10);
      expect(res.message).not.toBe(UNEXPECTED_ACTION_FAILURE);
      if (c.message) expect(res.message).toMatch(c.message);
      if (c.field) expect(Object.keys(res.fieldErrors), JSON.stringify(res.fieldErrors).slice(0, 500)).toContain(c.field);
      expect(errors).not.toHaveBeenCalled();
      expect(await prints()).toEqual(before);
    });
  });
});
