// Bundles the production server and its database thread into .next after `next build`
// (scripts/server-bundles.mjs).
import { buildServerBundles, SERVER_BUNDLES } from "./server-bundles.mjs";

await buildServerBundles(".next");
console.log(`Built ${SERVER_BUNDLES.map((b) => `.next/${b.file}`).join(" and ")}`);
