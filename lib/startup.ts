// Server start-up: open the database, apply migrations and seed the demo shop before the first
// request; stop the process with one clear line if that fails.
import { getDatabase } from "@/db/client";

export async function startServer(): Promise<void> {
  try {
    const { kind } = await getDatabase();
    console.log(`Grindfade database ready (${kind}).`);
  } catch (err) {
    console.error(`Grindfade cannot start: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  }
}
