// Bundles server.ts (the production server) into .next/grindfade-server.cjs after `next build`.
// Our own modules are bundled; packages stay in node_modules, as Next.js's build leaves them.
import { build } from "esbuild";

await build({
  entryPoints: ["server.ts"],
  outfile: ".next/grindfade-server.cjs",
  bundle: true,
  platform: "node",
  target: "node20",
  format: "cjs",
  packages: "external",
  tsconfig: "tsconfig.json",
  // db/client.ts finds its migrations beside itself through import.meta.url.
  define: { "import.meta.url": "__bundleUrl" },
  banner: { js: 'const __bundleUrl = require("node:url").pathToFileURL(__filename).href;' },
  logLevel: "warning",
});
console.log("Built .next/grindfade-server.cjs");
