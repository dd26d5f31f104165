// Crash safety of stroke saves: the production server on PGlite is stopped with SIGKILL and with
// SIGTERM while ten phones post 1,000 strokes, then started again on the same data directory.
// The run is scripts/crash-safety.ts (also `npm run crash-safety`); it starts servers of its own,
// on their own ports and data directories, and leaves the shared end-to-end server alone.
import { describe, expect, it } from "vitest";
import { crashRun, describeRun, type CrashRun, type StopSignal } from "../../scripts/crash-safety";
import { randomSecret } from "./server";

const STROKES = 1000;
const CLIENTS = 10;

async function run(signal: StopSignal): Promise<CrashRun> {
  const r = await crashRun(randomSecret(), signal, { strokes: STROKES, clients: CLIENTS });
  console.log(describeRun(r).join("\n"));
  return r;
}

function expectNothingLostOrDoubled(r: CrashRun) {
  // The signal fell midway: some strokes were acknowledged, some never sent.
  expect(r.acknowledged).toBeGreaterThan(0);
  expect(r.unsent).toBeGreaterThan(0);
  // Read back through GET /api/seats/{id} after the restart, before anything was resent.
  expect(r.lost).toBe(0);
  expect(r.duplicates).toBe(0);
  expect(r.strangers).toBe(0);
  expect(r.present).toBe(r.acknowledged + r.landedWithoutAnswer);
  // Every stroke without a success answer sent again: the ones that had landed are recognised.
  expect(r.resentFailed).toBe(0);
  expect(r.resentAlreadyThere).toBe(r.landedWithoutAnswer);
  expect(r.resentAccepted).toBe(r.resent - r.landedWithoutAnswer);
  // Acknowledged strokes sent once more (every tenth) are answered "already stored".
  expect(r.resentAcknowledged).toBeGreaterThan(0);
  expect(r.resentAcknowledgedRecognised).toBe(r.resentAcknowledged);
  expect(r.finalPresent).toBe(STROKES);
  expect(r.finalDuplicates).toBe(0);
  expect(r.controlStateAfterRestart).toBe("in production");
  expect(r.problems).toEqual([]);
}

describe("crash safety of stroke saves on PGlite", () => {
  it(
    "SIGKILL midway: every acknowledged stroke survives the restart, none twice",
    { timeout: 600_000 },
    async () => {
      const r = await run("SIGKILL");
      expect(r.exit.signal).toBe("SIGKILL");
      // A real crash: the control file still says the cluster was running.
      expect(r.controlStateAfterStop).toBe("in production");
      expectNothingLostOrDoubled(r);
    },
  );

  it(
    "SIGTERM midway: the database is closed cleanly, and nothing is lost or doubled",
    { timeout: 600_000 },
    async () => {
      const r = await run("SIGTERM");
      expect(r.exit.code).toBe(143);
      expect(r.controlStateAfterStop).toBe("shut down");
      expect(r.stopLogLine).toMatch(
        /^Grindfade stopped on SIGTERM .*database \(pglite\) closed cleanly/,
      );
      // New work after the signal is refused with a 503 the outbox retries.
      for (const status of r.refusedStatuses) expect(status).toBe(503);
      expectNothingLostOrDoubled(r);
    },
  );
});
