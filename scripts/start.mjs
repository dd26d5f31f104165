// `npm start`: the production server (server.ts), as bundled by `npm run build`. Says what to
// do when there is no build yet, instead of a module-not-found trace.
import fs from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";

const bundle = path.join(process.cwd(), ".next", "grindfade-server.cjs");
if (!fs.existsSync(bundle) || !fs.existsSync(path.join(process.cwd(), ".next", "BUILD_ID"))) {
  console.error("Grindfade cannot start: there is no production build here. Run `npm run build` first.");
  process.exit(1);
}
await import(pathToFileURL(bundle).href);
