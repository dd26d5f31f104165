// Synthetic sessions shared by several test files, built once per process.

import { decayingContrasts, synthesizeSession, type SynthEvent, type SynthSession } from "@/lib/audio/synth";

/** Contrast 12 dB decaying toward 0.3 dB by e every 4 strokes: settles. */
export function decayingSession(sampleRate: number, count = 20, seed = 7): SynthSession {
  return synthesizeSession({
    sampleRate,
    seed,
    strokes: decayingContrasts(count, 12, 0.3, 4).map((contrastDb) => ({ contrastDb })),
  });
}

/**
 * A decaying session with long pauses after strokes 4 and 8 for speech, a
 * dropped tool's ring and a tap to be put into.
 */
export function sessionWithPauses(sampleRate: number, events: (s: SynthSession) => SynthEvent[], seed = 5): SynthSession {
  const spec = {
    sampleRate,
    seed,
    strokes: decayingContrasts(14, 10, 0.3, 3).map((contrastDb, i) => ({
      contrastDb,
      gapS: i === 3 || i === 7 ? 5 : undefined,
    })),
  };
  const plain = synthesizeSession(spec);
  return synthesizeSession({ ...spec, events: events(plain) });
}

/** The first stroke count at which the settled rule holds on `values`, 1-based; Infinity if never. */
export function firstHolding(values: number[], maxContrastDb: number, maxSlope: number, consecutive = 4): number {
  for (let end = consecutive; end <= values.length; end++) {
    const w = values.slice(end - consecutive, end);
    if (w.some((v) => v > maxContrastDb)) continue;
    const mx = (consecutive - 1) / 2;
    const my = w.reduce((a, b) => a + b, 0) / consecutive;
    let sxy = 0;
    let sxx = 0;
    w.forEach((v, i) => {
      sxy += (i - mx) * (v - my);
      sxx += (i - mx) ** 2;
    });
    if (Math.abs(sxy / sxx) <= maxSlope) return end;
  }
  return Infinity;
}
