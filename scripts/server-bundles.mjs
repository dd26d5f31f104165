// The production server's own bundles, built by esbuild after `next build`: the server
// (server.ts) and the database thread it runs PGlite on (db/pglite-thread.ts). Our own modules
// are bundled; packages stay in node_modules, as Next.js's build leaves them.
import path from "node:path";
import { build } from "esbuild";

export const SERVER_BUNDLES = [
  { entry: "server.ts", file: "grindfade-server.cjs" },
  { entry: "db/pglite-thread.ts", file: "grindfade-db-thread.cjs" },
];

/** Builds the bundles (all, or those of the entries given) into outdir; returns their paths by entry. */
export async function buildServerBundles(outdir = ".next", entries = SERVER_BUNDLES.map((b) => b.entry)) {
  const built = {};
  for (const { entry, file } of SERVER_BUNDLES.filter((b) => entries.includes(b.entry))) {
    const outfile = path.join(outdir, file);
    await build({
      entryPoints: [entry],
      outfile,
      bundle: true,
      platform: "node",
      target: "node20",
      format: "cjs",
      packages: "external",
      tsconfig: "tsconfig.json",
      // Error classes cross the database thread's boundary by class; their names stay readable in logs.
      keepNames: true,
      // db/client.ts finds its migrations beside itself through import.meta.url.
      define: { "import.meta.url": "__bundleUrl" },
      banner: { js: 'const __bundleUrl = require("node:url").pathToFileURL(__filename).href;' },
      logLevel: "warning",
    });
    built[entry] = outfile;
  }
  return built;
}
