// Shared test plumbing: external reference tools (sox, aubioonset, espeak-ng, ffmpeg)
// and a scratch directory for the WAV files the tests generate. A missing tool
// skips its tests locally, with the reason printed, but fails them in CI.

import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { encodeWav, decodeWavMono } from "@/lib/audio/wav";

const probes: Record<string, string[]> = {
  sox: ["--version"],
  aubioonset: ["--help"],
  "espeak-ng": ["--version"],
  ffmpeg: ["-version"],
};

export function hasTool(name: keyof typeof probes): boolean {
  const r = spawnSync(name, probes[name], { stdio: "ignore" });
  return r.error === undefined;
}

/**
 * True when tests needing `name` should be skipped: only outside CI. In CI a
 * missing tool lets the tests run and fail on the spawn error.
 */
export function skipWithout(name: keyof typeof probes): boolean {
  if (hasTool(name)) return false;
  if (process.env.CI) return false;
  console.warn(`skipping tests that need ${name}: it is not installed (apt-get install ${name === "aubioonset" ? "aubio-tools" : name})`);
  return true;
}

export function scratchDir(): { dir: string; path: (name: string) => string; cleanup: () => void } {
  const dir = mkdtempSync(join(tmpdir(), "grindfade-audio-"));
  return { dir, path: (n) => join(dir, n), cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

export function writeWav(path: string, samples: Float32Array, sampleRate: number, bits: 16 | 24 | 32 = 16): void {
  writeFileSync(path, encodeWav([samples], sampleRate, { bitsPerSample: bits }));
}

export function readMono(path: string) {
  return decodeWavMono(readFileSync(path));
}

export function sox(args: string[]): string {
  // sox prints `stats` on stderr; merge so callers can parse it.
  const r = spawnSync("sox", args, { encoding: "utf8" });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(`sox ${args.join(" ")} failed: ${r.stderr}`);
  return r.stdout + r.stderr;
}

/** "RMS lev dB" from `sox FILE -n stats` (overall column). */
export function soxRmsDb(path: string, extra: string[] = []): number {
  const out = sox([path, "-n", ...extra, "stats"]);
  const line = out.split("\n").find((l) => l.startsWith("RMS lev dB"));
  if (!line) throw new Error(`no RMS line in sox stats output:\n${out}`);
  return Number(line.trim().split(/\s+/)[3]);
}

export function aubioOnsets(path: string): number[] {
  const out = execFileSync("aubioonset", ["-i", path, "-O", "hfc", "-M", "0.3"], { encoding: "utf8" });
  return out
    .split("\n")
    .map((l) => l.trim())
    .filter((l) => l.length > 0)
    .map(Number);
}

/** Real speech from espeak-ng, resampled by sox to the wanted rate. */
export function espeakSpeech(text: string, sampleRate: number, dir: string, name: string): Float32Array {
  const raw = join(dir, `${name}-raw.wav`);
  const out = join(dir, `${name}.wav`);
  execFileSync("espeak-ng", ["-w", raw, text]);
  sox([raw, "-r", String(sampleRate), "-b", "16", out]);
  return readMono(out).samples;
}

export { readFileSync };
