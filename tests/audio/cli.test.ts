import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { execFile } from "node:child_process";
import { writeFileSync } from "node:fs";
import { promisify } from "node:util";
import { z } from "zod";
import { encodeWav } from "@/lib/audio/wav";
import { decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { scratchDir } from "./helpers";
import { decayingSession } from "./sessions";

const run = promisify(execFile);
const scratch = scratchDir();
afterAll(() => scratch.cleanup());

async function analyze(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const r = await run("npm", ["run", "--silent", "analyze", "--", ...args], { cwd: process.cwd() });
    return { code: 0, stdout: r.stdout, stderr: r.stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

// The report's shape, field by field.
const Report = z
  .object({
    sampleRate: z.number().int(),
    durationS: z.number(),
    noiseFloors: z.object({ levelDbfs: z.number(), grindDbfs: z.number(), voiceDbfs: z.number() }).strict(),
    leftOut: z.object({ strokes: z.number().int(), byFlag: z.record(z.string(), z.number().int()) }).strict(),
    strokes: z.array(
      z
        .object({
          index: z.number().int().positive(),
          startS: z.number(),
          endS: z.number(),
          onsetDb: z.number(),
          bodyDb: z.number(),
          contrastDb: z.number(),
          bandSnrDb: z.number(),
          flags: z.array(z.enum(["clipping", "too-quiet", "speech", "impulsive", "start-not-heard", "end-not-heard"])),
          reasons: z.array(z.string().min(3)),
        })
        .strict(),
    ),
    fit: z.object({ floorDb: z.number().nullable(), strokesRemaining: z.number().int().nullable() }).strict(),
    settled: z
      .object({
        atStroke: z.number().int(),
        atS: z.number(),
        rule: z.object({ consecutive: z.literal(4), maxContrastDb: z.literal(1.5), maxSlopeDbPerStroke: z.literal(0.3) }).strict(),
      })
      .strict()
      .nullable(),
    notSettling: z.boolean(),
    warnings: z.array(z.string()),
  })
  .strict();

describe("command-line analyzer", () => {
  let good: string;
  const bad: Record<string, string> = {};
  beforeAll(() => {
    const s = decayingSession(48000, 20, 7);
    good = scratch.path("session.wav");
    const bytes = encodeWav([s.samples], 48000, { bitsPerSample: 16 });
    writeFileSync(good, bytes);
    bad.empty = scratch.path("empty.wav");
    writeFileSync(bad.empty, new Uint8Array(0));
    bad.truncated = scratch.path("truncated.wav");
    writeFileSync(bad.truncated, bytes.subarray(0, 5000));
    bad.notRiff = scratch.path("notes.wav");
    writeFileSync(bad.notRiff, "valve 3: lapped, leak test ok\n".repeat(10));
    bad.unsupported = scratch.path("adpcm.wav");
    const u = new Uint8Array(bytes.subarray(0, 20000));
    const v = new DataView(u.buffer);
    v.setUint32(40, 20000 - 44, true);
    v.setUint16(20, 0x11, true); // IMA ADPCM
    writeFileSync(bad.unsupported, u);
    bad.lowRate = scratch.path("8k.wav");
    writeFileSync(bad.lowRate, encodeWav([new Float32Array(8000)], 8000, { bitsPerSample: 16 }));
  });

  it("prints exactly one JSON object in the documented shape with --json", async () => {
    const r = await analyze([good, "--json", "--stage", "fine"]);
    expect(r.code).toBe(0);
    expect(r.stderr).toBe("");
    expect(r.stdout.trim().split("\n")).toHaveLength(1);
    const report = Report.parse(JSON.parse(r.stdout));
    expect(report.sampleRate).toBe(48000);
    expect(report.strokes).toHaveLength(20);
    expect(report.settled).not.toBeNull();
    expect(report.settled!.atS).toBe(report.strokes[report.settled!.atStroke - 1].startS);
  });

  it("prints a table and the verdict without --json", async () => {
    const r = await analyze([good]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/contrast/);
    expect(r.stdout).toMatch(/Verdict: SETTLED at stroke \d+/);
    expect(r.stdout.split("\n").filter((l) => /^\s+\d+\s+\d+\.\d{3}/.test(l))).toHaveLength(20);
  });

  it("reports a left-out stroke's flag, its reason and every stroke's band SNR, in JSON and in the table", async () => {
    const base = { sampleRate: 48000, seed: 8, strokes: decayingContrasts(8, 11, 0.3, 3).map((contrastDb) => ({ contrastDb })) };
    const plain = synthesizeSession(base);
    const t = plain.strokes[3];
    const s = synthesizeSession({ ...base, events: [{ kind: "rattle", atS: t.startS + 0.1, durationS: t.endS - t.startS - 0.1, levelDbfs: -10 }] });
    const file = scratch.path("rattle.wav");
    writeFileSync(file, encodeWav([s.samples], 48000, { bitsPerSample: 16 }));
    const report = Report.parse(JSON.parse((await analyze([file, "--json"])).stdout));
    expect(report.strokes[3].flags).toEqual(["impulsive"]);
    expect(report.strokes[3].reasons).toEqual(["a knock or rattle over the stroke"]);
    expect(report.strokes.filter((st) => st.flags.length > 0)).toHaveLength(1);
    expect(report.leftOut).toEqual({ strokes: 1, byFlag: { impulsive: 1 } });
    report.strokes.forEach((st) => expect(st.bandSnrDb).toBeGreaterThan(20));
    const text = (await analyze([file])).stdout;
    expect(text).toMatch(/SNR dB/);
    expect(text.split("\n").find((l) => /^\s+4\s/.test(l))).toMatch(/a knock or rattle over the stroke/);
    expect(text).toMatch(/^1 stroke left out: a knock or rattle over the stroke \(kept above, not judged\)\.$/m);
  });

  it.each([
    ["missing", () => scratch.path("nope.wav"), /no such file/],
    ["empty", () => bad.empty, /empty/],
    ["truncated", () => bad.truncated, /truncated/],
    ["not RIFF", () => bad.notRiff, /not a WAV file/],
    ["unsupported", () => bad.unsupported, /unsupported WAV encoding/],
    ["too low a rate", () => bad.lowRate, /8000 Hz is outside/],
  ])("a %s file exits 2 with one clear line on stderr", async (_label, file, message) => {
    const r = await analyze([file(), "--json"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    const lines = r.stderr.trim().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(message);
    expect(r.stderr).not.toMatch(/\bat .*:\d+:\d+/);
  });

  it.each([
    [[], /no file given/],
    [["a.wav", "b.wav"], /only one file/],
    [["x.wav", "--stage", "polish"], /--stage must be coarse or fine, got "polish"/],
    [["x.wav", "--verbose"], /unknown option --verbose/],
  ])("bad usage %o exits 2", async (args, message) => {
    const r = await analyze(args);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
  });
});
