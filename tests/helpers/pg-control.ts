// The cluster state PostgreSQL records in a data directory's control file. Reference:
// PostgreSQL's src/include/catalog/pg_control.h — ControlFileData begins with uint64
// system_identifier, uint32 pg_control_version, uint32 catalog_version_no, then the DBState enum
// `state`. PGlite is PostgreSQL compiled to WebAssembly, which is little-endian on every host.
import fs from "node:fs";
import path from "node:path";

const DB_STATES = [
  "starting up",
  "shut down",
  "shut down in recovery",
  "shutting down",
  "in crash recovery",
  "in archive recovery",
  "in production",
] as const;

/** PG_CONTROL_VERSION of PostgreSQL 18 (pg_control.h), the major version PGlite 0.5 embeds. */
const PG_CONTROL_VERSION = 1800;

/** "shut down" after a clean close, "in production" while open or after a crash. */
export function clusterState(pgliteDir: string): string {
  const bytes = fs.readFileSync(path.join(pgliteDir, "global", "pg_control"));
  const version = bytes.readUInt32LE(8);
  if (version !== PG_CONTROL_VERSION) return `unknown (pg_control_version ${version})`;
  const state = bytes.readUInt32LE(16);
  return DB_STATES[state] ?? `unknown (${state})`;
}
