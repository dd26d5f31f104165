// Runs once when the server starts: opens the database, applies migrations and seeds the demo
// shop before the first request, and stops the server with one clear line if that fails.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  // During `next build` no database is opened: prerendering must never touch the data directory.
  if (process.env.NEXT_PHASE === "phase-production-build") return;
  const { getDatabase } = await import("./db/client");
  try {
    const { kind } = await getDatabase();
    console.log(`Grindfade database ready (${kind}).`);
  } catch (err) {
    console.error(`Grindfade cannot start: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  }
}
