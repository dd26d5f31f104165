// First-load JavaScript per page, read from the production build the end-to-end server runs:
// every page within its goal, every page of the app's route tree measured, and the chunk list
// the script reads from the manifests equal to the scripts the server really puts in the HTML.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { describe, expect, inject, it } from "vitest";
import { DEMO_USERS } from "@/db/seed";
import { goalFor, kb, pageWeights, routeOf, WEIGHT_GOALS } from "../../scripts/page-weight";
import { sessionCookie } from "./http-sign-in";

const baseURL = inject("baseURL");
const nextDir = path.join(process.cwd(), ".next");

/** Every page.tsx under app/, as its URL pattern (route groups left out). */
function routeTree(dir = path.join(process.cwd(), "app"), prefix = ""): string[] {
  const found: string[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    if (entry.isDirectory()) found.push(...routeTree(path.join(dir, entry.name), `${prefix}/${entry.name}`));
    else if (entry.name === "page.tsx") found.push(routeOf(`${prefix}/page`));
  }
  return found;
}

/**
 * The chunks a page's HTML makes the browser load: its <script src> tags, and the chunks its
 * inline React Server Components payload names for the client components rendered (error and
 * not-found boundaries of a streamed page arrive that way). The nomodule polyfill is left out.
 */
async function chunksLoadedByHtml(url: string, cookie?: string): Promise<string[]> {
  const res = await fetch(url, { headers: cookie ? { cookie } : {}, redirect: "manual" });
  expect(res.status).toBe(200);
  const html = await res.text();
  const noModule = new Set(
    [...html.matchAll(/<script\b[^>]*\bnoModule\b[^>]*>/gi)].map((m) => /\bsrc="\/_next\/([^"]+)"/.exec(m[0])?.[1]),
  );
  const named = [...html.matchAll(/static\/chunks\/[\w.-]+?\.js/g)].map((m) => m[0]);
  return [...new Set(named)].filter((f) => !noModule.has(f));
}


describe("page weight", () => {
  const weights = pageWeights(nextDir);

  it("measures every page of the app's route tree, and the not-found page Next builds from app/not-found.tsx", () => {
    expect(weights.map((w) => w.route).sort()).toEqual([...routeTree(), "/_not-found"].sort());
  });

  it("keeps the bench screen within 200 kB and every other page within 250 kB of gzipped first-load JavaScript", () => {
    const bench = weights.find((w) => w.route === "/bench/[seatId]");
    expect(bench?.goalKb).toBe(WEIGHT_GOALS.bench);
    for (const w of weights) {
      expect(w.goalKb).toBe(goalFor(w.route));
      expect(w.files.length, w.route).toBeGreaterThan(0);
      expect(kb(w.gzipBytes), `${w.route}: ${kb(w.gzipBytes).toFixed(1)} kB`).toBeLessThanOrEqual(w.goalKb);
    }
  });

  it("counts every chunk the server's HTML makes a browser load, and beyond those only boundary chunks", async () => {
    const supervisor = DEMO_USERS.find((u) => u.role === "supervisor")!;
    const cookie = await sessionCookie(baseURL, supervisor.email, supervisor.password);
    for (const [route, headers] of [
      ["/sign-in", undefined],
      ["/jobs", cookie],
      ["/audit", cookie],
    ] as const) {
      const w = weights.find((x) => x.route === route)!;
      const loaded = await chunksLoadedByHtml(`${baseURL}${route}`, headers);
      // Nothing the page loads is missed…
      expect(loaded.filter((f) => !w.files.includes(f)), route).toEqual([]);
      // …and the root, layout and page chunks are all loaded; what is counted beyond that
      // belongs only to error or not-found boundaries.
      const needed = new Set([
        ...w.rootFiles,
        ...Object.entries(w.segments)
          .filter(([segment]) => /\/(layout|page)$/.test(segment))
          .flatMap(([, files]) => files),
      ]);
      expect([...needed].filter((f) => !loaded.includes(f)), route).toEqual([]);
      const boundaryOnly = w.files.filter((f) => !needed.has(f));
      for (const f of boundaryOnly.filter((f) => !loaded.includes(f))) {
        const owners = Object.entries(w.segments).filter(([, files]) => files.includes(f)).map(([segment]) => segment);
        expect(owners.every((s) => /\/(not-found|forbidden|error|global-error)$/.test(s)), `${route}: ${f} from ${owners.join(", ")}`).toBe(true);
      }
    }
  });

  it("the command prints every page with its verdict and exits 0", () => {
    const run = spawnSync(process.execPath, [path.join("node_modules", "tsx", "dist", "cli.mjs"), "scripts/page-weight.ts"], {
      encoding: "utf8",
    });
    expect(run.status, run.stderr).toBe(0);
    for (const w of weights) expect(run.stdout).toMatch(new RegExp(`^${w.route.replace(/[[\]]/g, "\\$&")}\\s.*≤ ${w.goalKb} met$`, "m"));
    expect(run.stdout).toContain(`all ${weights.length} pages within their goals`);
  });
});
