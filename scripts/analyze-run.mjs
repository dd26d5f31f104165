// Starts the command-line analyzer from a plain-JavaScript bundle of scripts/analyze.ts, built
// with esbuild on first use and rebuilt whenever a source is newer, so each run costs a Node
// start-up and the analysis, not a TypeScript compile.
import { existsSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const entry = path.join(root, "scripts", "analyze.ts");
const bundle = path.join(root, "node_modules", ".cache", "grindfade", "analyze.mjs");

function newestSource() {
  let newest = statSync(entry).mtimeMs;
  const dir = path.join(root, "lib", "audio");
  for (const f of readdirSync(dir)) if (f.endsWith(".ts")) newest = Math.max(newest, statSync(path.join(dir, f)).mtimeMs);
  return newest;
}

if (!existsSync(bundle) || statSync(bundle).mtimeMs < newestSource()) {
  const { build } = await import("esbuild");
  await build({
    entryPoints: [entry],
    outfile: bundle,
    bundle: true,
    platform: "node",
    format: "esm",
    target: "node20",
    packages: "external",
    logLevel: "error",
    // Packages stay in node_modules; their CommonJS needs require() inside an ES module.
    banner: { js: 'import { createRequire } from "node:module"; const require = createRequire(import.meta.url);' },
  });
}

await import(pathToFileURL(bundle).href);
