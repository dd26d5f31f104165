// Fake-microphone recordings for the bench screen tests, made by the project's synthesizer:
// a quiet lead-in for calibration, lapping strokes, and several seconds of silence at the end
// (Chromium repeats the last few milliseconds of a %noloop file forever).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { encodeWav } from "@/lib/audio/wav";

export interface FakeMicFile {
  path: string;
  contrastsDb: number[];
  durationS: number;
}

function write(name: string, contrasts: number[], seed: number, sampleRate = 48000): FakeMicFile {
  const session = synthesizeSession({
    sampleRate,
    seed,
    leadInS: 3.5,
    tailS: 0.5,
    strokes: contrasts.map((c) => ({ contrastDb: c, durationS: 0.7, gapS: 0.55 })),
  });
  const silence = new Float32Array(sampleRate * 6);
  const all = new Float32Array(session.samples.length + silence.length);
  all.set(session.samples);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-mic-"));
  const file = path.join(dir, `${name}.wav`);
  fs.writeFileSync(file, encodeWav([all], sampleRate, { bitsPerSample: 16 }));
  return { path: file, contrastsDb: contrasts, durationS: all.length / sampleRate };
}

/** Contrast falls from 12 dB toward 0.3 dB and stays there: settles. */
export function decayingSession(): FakeMicFile {
  return write("decaying", decayingContrasts(16, 12, 0.3, 2.5), 11);
}

/** Contrast falls but flattens at 5 dB: never settles, reports not settling. */
export function flatHighSession(): FakeMicFile {
  return write("flat-high", decayingContrasts(18, 11, 5, 2), 23);
}
