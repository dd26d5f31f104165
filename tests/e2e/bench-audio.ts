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
  return save(name, session.samples, contrasts, sampleRate);
}

/**
 * A shop's start: the technician is already lapping while the screen says "stay quiet" (a long
 * stroke from 0.8 s to 5 s, over every room measurement that starts before it ends), then
 * strokes that fade, one of them under an impact wrench's rattle. `contrastsDb` are the real
 * strokes after the long one; `rattledStroke` is the 1-based number of the rattled one among them.
 */
export function busyBaySession(sampleRate = 48000): FakeMicFile & { rattledStroke: number } {
  // Fading toward 3 dB: still fading at the end, so no cue covers the screen.
  const contrasts = decayingContrasts(10, 10, 3, 2.5);
  const spec = {
    sampleRate,
    seed: 41,
    leadInS: 0.8,
    tailS: 0.5,
    strokes: [{ contrastDb: 0.3, durationS: 4.2, gapS: 3.5 }, ...contrasts.map((c) => ({ contrastDb: c, durationS: 0.8, gapS: 0.6 }))],
  };
  const plain = synthesizeSession(spec);
  const rattled = plain.strokes[4];
  const session = synthesizeSession({
    ...spec,
    events: [{ kind: "rattle", atS: rattled.startS + 0.05, durationS: rattled.endS - rattled.startS - 0.1, levelDbfs: -12 }],
  });
  return { ...save("busy-bay", session.samples, contrasts, sampleRate), rattledStroke: 4 };
}

function save(name: string, samples: Float32Array, contrasts: number[], sampleRate: number): FakeMicFile {
  const silence = new Float32Array(sampleRate * 6);
  const all = new Float32Array(samples.length + silence.length);
  all.set(samples);
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
