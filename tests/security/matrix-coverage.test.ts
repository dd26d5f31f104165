// The role matrix covers the app exactly: every page, route handler method and server action on
// disk has a row, and every row names something that exists. A new route without a row fails
// here before anyone forgets to decide who may use it.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { ACTION_MATRIX, PAGE_MATRIX, PERSONAS, ROUTE_MATRIX } from "./role-matrix";
import {
  actionKey,
  listInlineServerActions,
  listPages,
  listRouteHandlers,
  listServerActions,
  routeKey,
  urlPattern,
} from "./route-tree";

const pageKeys = () => listPages().map((p) => p.pattern);
const routeKeys = () =>
  listRouteHandlers().flatMap((r) => r.methods.map((m) => routeKey(m, r.pattern)));
const actionKeys = () => listServerActions().map(actionKey);

/** What is on disk without a row, and what has a row but is not on disk. */
function gaps(onDisk: string[], matrix: string[]) {
  const rows = new Set(matrix);
  const disk = new Set(onDisk);
  return { missing: onDisk.filter((k) => !rows.has(k)), stale: matrix.filter((k) => !disk.has(k)) };
}

describe("reading the route tree", () => {
  it("finds the known pages, with route groups dropped and dynamic segments kept", () => {
    const pages = listPages();
    expect(pages.find((p) => p.file === "app/(shop)/jobs/[jobId]/page.tsx")?.pattern).toBe(
      "/jobs/[jobId]",
    );
    expect(pages.find((p) => p.file === "app/(auth)/sign-in/page.tsx")?.pattern).toBe("/sign-in");
    expect(pages.find((p) => p.file === "app/(shop)/page.tsx")?.pattern).toBe("/");
    // Every page file is listed once, and no two files claim one URL.
    expect(new Set(pages.map((p) => p.pattern)).size).toBe(pages.length);
  });

  it("reads each route handler's methods from its exports, in every form they are written", () => {
    const byPattern = new Map(listRouteHandlers().map((r) => [r.pattern, r.methods]));
    // `export { handler as GET, handler as POST }`
    expect(byPattern.get("/api/auth/[...nextauth]")).toEqual(["GET", "POST"]);
    // `export async function GET()`
    expect(byPattern.get("/api/health")).toEqual(["GET"]);
    // `export const GET = …; export const HEAD = …; export const PUT = …`
    expect(byPattern.get("/api/sessions/[sessionId]/recording/chunks")).toEqual([
      "GET",
      "HEAD",
      "PUT",
    ]);
  });

  it("maps folders to URL patterns the way the App Router does", () => {
    expect(urlPattern("(shop)/jobs/[jobId]/page.tsx")).toBe("/jobs/[jobId]");
    expect(urlPattern("@modal/(.)photos/[id]/page.tsx")).toBe("/(.)photos/[id]");
    expect(urlPattern("api/auth/[...nextauth]/route.ts")).toBe("/api/auth/[...nextauth]");
    expect(urlPattern("(shop)/_parts/page.tsx")).toBeNull();
    expect(urlPattern("page.tsx")).toBe("/");
  });

  it("finds every exported server action of the 'use server' modules", () => {
    const actions = actionKeys();
    expect(actions).toContain("lib/actions/jobs.ts#createJob");
    expect(actions).toContain("lib/actions/users.ts#changeRole");
    // state.ts holds the shared result shape and is no "use server" module.
    expect(actions.some((a) => a.startsWith("lib/actions/state.ts"))).toBe(false);
  });
});

describe("the matrix and the app agree", () => {
  it("has a row for every page and none for a page that does not exist", () => {
    expect(gaps(pageKeys(), Object.keys(PAGE_MATRIX))).toEqual({ missing: [], stale: [] });
  });

  it("has a row for every method of every route handler and none for a method that does not exist", () => {
    expect(gaps(routeKeys(), Object.keys(ROUTE_MATRIX))).toEqual({ missing: [], stale: [] });
  });

  it("has a row for every server action and none for an action that does not exist", () => {
    expect(gaps(actionKeys(), Object.keys(ACTION_MATRIX))).toEqual({ missing: [], stale: [] });
  });

  it("has no inline server action, which no row could name", () => {
    expect(listInlineServerActions()).toEqual([]);
  });

  it("gives every row an outcome for each of the five personas and a reason", () => {
    for (const [key, row] of [
      ...Object.entries(PAGE_MATRIX),
      ...Object.entries(ROUTE_MATRIX),
      ...Object.entries(ACTION_MATRIX),
    ]) {
      for (const p of PERSONAS) expect(row[p], `${key} for ${p}`).toBeDefined();
      expect(row.why.length, key).toBeGreaterThan(10);
    }
  });
});

describe("the check catches a route added without a row", () => {
  // A copy of the app's route tree with one more page, route and action in it, read by the same
  // functions: what the coverage tests above would see if someone added them.
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-route-tree-"));
  afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));
  const write = (rel: string, text: string) => {
    fs.mkdirSync(path.dirname(path.join(tmp, rel)), { recursive: true });
    fs.writeFileSync(path.join(tmp, rel), text);
  };

  it("reports the new page, the new method and the new action as missing", () => {
    write(
      "app/(shop)/tools/[toolId]/page.tsx",
      "export default function Page() { return null; }\n",
    );
    write(
      "app/api/tools/route.ts",
      'export async function GET() { return new Response("[]"); }\nexport const DELETE = GET;\n',
    );
    write("lib/actions/tools.ts", '"use server";\nexport async function lendTool() {}\n');
    const pages = listPages(path.join(tmp, "app")).map((p) => p.pattern);
    const routes = listRouteHandlers(path.join(tmp, "app")).flatMap((r) =>
      r.methods.map((m) => routeKey(m, r.pattern)),
    );
    const actions = listServerActions([path.join(tmp, "lib")]).map((a) => a.name);
    expect(gaps(pages, Object.keys(PAGE_MATRIX)).missing).toEqual(["/tools/[toolId]"]);
    expect(gaps(routes, Object.keys(ROUTE_MATRIX)).missing).toEqual([
      "GET /api/tools",
      "DELETE /api/tools",
    ]);
    expect(actions).toEqual(["lendTool"]);
  });

  it("finds an action written inline in a server component", () => {
    write(
      "app/(shop)/tools/page.tsx",
      'export default function Page() {\n  async function lend() {\n    "use server";\n  }\n  return <form action={lend} />;\n}\n',
    );
    expect(listInlineServerActions([path.join(tmp, "app")])).toEqual([
      expect.stringMatching(/tools\/page\.tsx:2$/),
    ]);
  });
});
