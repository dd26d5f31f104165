// First-load JavaScript per page, read from the production build in .next: the scripts a
// browser must fetch before the page runs, gzipped as the server sends them.
//
// Per page that is the framework's root chunks (build-manifest.json "rootMainFiles") and the
// entry chunks of every segment of the page — root layout, layouts, the page, and the error and
// not-found boundaries around them — which Turbopack lists under "entryJSFiles" in the page's
// page_client-reference-manifest.js. The server's HTML loads the root, layout and page chunks
// as <script src async> tags and the boundaries' chunks through its inline React Server
// Components payload; a streamed page may leave a boundary chunk unfetched when another chunk
// already holds its components, so the figure is an upper bound, a few kB at most above what a
// browser fetches. Not counted: the legacy polyfill chunk (a nomodule script that modern
// browsers skip), chunks a page imports later on demand, and CSS.
// Sizes are gzip at zlib's default level, which is what `next start` uses (its compression
// middleware runs with default options).
//
// Run: npm run bench:weight   (after `next build`); exits 1 when a page misses its goal.
import fs from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";
import vm from "node:vm";
import zlib from "node:zlib";

/** Goals in kB (1 kB = 1024 bytes) of gzipped first-load JavaScript. */
export const WEIGHT_GOALS = { bench: 200, other: 250 } as const;

export interface PageWeight {
  /** The URL pattern, route groups left out: "/bench/[seatId]". */
  route: string;
  /** The app-router page key: "/(bench)/bench/[seatId]/page". */
  page: string;
  /** Chunk paths relative to .next, deduplicated, in load order. */
  files: string[];
  /** The build's root chunks, and each segment's entry chunks by segment ("[project]/app/layout"). */
  rootFiles: string[];
  segments: Record<string, string[]>;
  rawBytes: number;
  gzipBytes: number;
  goalKb: number;
}

interface ClientReferenceManifest {
  entryJSFiles?: Record<string, string[]>;
}

function readJson<T>(file: string): T {
  return JSON.parse(fs.readFileSync(file, "utf8")) as T;
}

/** The manifest file assigns to globalThis.__RSC_MANIFEST[page]; run it in a sandbox to read it. */
function clientReferenceManifest(file: string, page: string): ClientReferenceManifest {
  const sandbox: { __RSC_MANIFEST?: Record<string, ClientReferenceManifest> } = {};
  vm.runInNewContext(fs.readFileSync(file, "utf8"), sandbox, { filename: file });
  const manifest = sandbox.__RSC_MANIFEST?.[page];
  if (!manifest) throw new Error(`${file} holds no client reference manifest for ${page}.`);
  return manifest;
}

export function routeOf(page: string): string {
  const parts = page
    .replace(/\/page$/, "")
    .split("/")
    .filter((p) => p && !(p.startsWith("(") && p.endsWith(")")));
  return `/${parts.join("/")}`;
}

export function goalFor(route: string): number {
  return route.startsWith("/bench/") ? WEIGHT_GOALS.bench : WEIGHT_GOALS.other;
}

/** First-load JavaScript of every page in the build at `nextDir`. */
export function pageWeights(nextDir: string): PageWeight[] {
  if (!fs.existsSync(path.join(nextDir, "BUILD_ID"))) {
    throw new Error(`No production build in ${nextDir}: run \`next build\` first.`);
  }
  const build = readJson<{ rootMainFiles: string[] }>(path.join(nextDir, "build-manifest.json"));
  const appPaths = readJson<Record<string, string>>(path.join(nextDir, "server", "app-paths-manifest.json"));
  const sizes = new Map<string, { raw: number; gzip: number }>();
  const sizeOf = (file: string) => {
    let s = sizes.get(file);
    if (!s) {
      const bytes = fs.readFileSync(path.join(nextDir, file));
      s = { raw: bytes.length, gzip: zlib.gzipSync(bytes).length };
      sizes.set(file, s);
    }
    return s;
  };
  const pages = Object.entries(appPaths).filter(([page]) => page.endsWith("/page") && page !== "/_global-error/page");
  return pages.map(([page, serverFile]) => {
    const manifestFile = path.join(nextDir, "server", serverFile.replace(/\.js$/, "_client-reference-manifest.js"));
    const entries = clientReferenceManifest(manifestFile, page).entryJSFiles ?? {};
    const files = [...new Set([...build.rootMainFiles, ...Object.values(entries).flat()])];
    const route = routeOf(page);
    let rawBytes = 0;
    let gzipBytes = 0;
    for (const f of files) {
      const s = sizeOf(f);
      rawBytes += s.raw;
      gzipBytes += s.gzip;
    }
    return { route, page, files, rootFiles: build.rootMainFiles, segments: entries, rawBytes, gzipBytes, goalKb: goalFor(route) };
  });
}

export const kb = (bytes: number) => bytes / 1024;

function main() {
  const nextDir = path.resolve(process.argv[2] ?? ".next");
  const rows = pageWeights(nextDir).sort((a, b) => a.route.localeCompare(b.route));
  const width = Math.max(...rows.map((r) => r.route.length), 5);
  console.log(`first-load JavaScript per page, from ${path.relative(process.cwd(), nextDir) || "."} (gzip, kB = 1024 bytes)`);
  console.log(`${"route".padEnd(width)}  ${"files".padStart(5)}  ${"raw kB".padStart(7)}  ${"gzip kB".padStart(7)}  goal`);
  let missed = 0;
  for (const r of rows) {
    const ok = kb(r.gzipBytes) <= r.goalKb;
    if (!ok) missed++;
    console.log(
      `${r.route.padEnd(width)}  ${String(r.files.length).padStart(5)}  ${kb(r.rawBytes).toFixed(1).padStart(7)}  ${kb(r.gzipBytes).toFixed(1).padStart(7)}  ≤ ${r.goalKb} ${ok ? "met" : "MISSED"}`,
    );
  }
  console.log(missed === 0 ? `all ${rows.length} pages within their goals` : `${missed} of ${rows.length} pages over their goal`);
  if (missed > 0) process.exitCode = 1;
}

if (process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href) {
  try {
    main();
  } catch (err) {
    console.error(err instanceof Error ? err.message : String(err));
    process.exit(1);
  }
}
