// Runs once when the server starts. The Node-only start-up lives in lib/startup.ts so that the
// edge bundle of this file stays free of Node APIs.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  // During `next build` no database is opened: prerendering must never touch the data directory.
  if (process.env.NEXT_PHASE === "phase-production-build") return;
  const { startServer } = await import("./lib/startup");
  await startServer();
}
