// A recording made with another app, analysed as the bench screen listens: the same
// LiveAnalyzer fed the same way (blocks of the capture worklet's size), the same room
// measurement taken again when something sounded during it (twice at most, then its quiet part
// is kept), and the same stop when the stage settles. Pure: no DOM, no React; the bench screen
// runs it in a Worker (components/bench/take.worker.ts) on the decoded samples.
import type { Stroke } from "@/lib/audio/analyzer";
import { createLiveAnalyzer } from "@/lib/audio/live";
import { judgeSeat, type SeatVerdict, type VerdictStroke } from "@/lib/audio/verdict";

/** Room measurements taken again, at most, when each heard a sound (as the bench screen does live). */
export const TAKE_CALIBRATION_RETRIES = 2;

/** Samples per push: the capture worklet's block (components/bench/use-listener.ts). */
export const TAKE_BLOCK = 256;

export interface TakeAnalysis {
  strokes: Stroke[];
  /** Strokes heard after the stage settled, not counted (listening live stops there). */
  afterSettled: number;
  /** Sounds the analyzer ignored as speech or ringing. */
  ignored: number;
  /** The room measurement heard something every time and kept its quiet part. */
  calibrationDisturbed: boolean;
  /** The room was never measured: the recording is shorter than the measurement. */
  calibrated: boolean;
  /** The verdict over the stage's earlier strokes and these. */
  verdict: SeatVerdict;
  durationS: number;
}

export interface TakeInput {
  samples: Float32Array;
  sampleRate: number;
  /** The stage's strokes already saved, in order: the verdict and the stop count them as live listening does. */
  earlier?: ReadonlyArray<{ contrastDb: number; flags: readonly string[]; startS: number }>;
  /** Called now and then with the share of the recording analysed (0–1). */
  onProgress?: (done: number) => void;
}

/** Mixes a decoded recording's channels down to one, as the microphone's single channel is. */
export function mixDown(channels: readonly Float32Array[]): Float32Array {
  if (channels.length === 1) return channels[0]!;
  const n = Math.min(...channels.map((c) => c.length));
  const out = new Float32Array(n);
  for (const c of channels) for (let i = 0; i < n; i++) out[i]! += c[i]! / channels.length;
  return out;
}

export function analyzeTake(input: TakeInput): TakeAnalysis {
  const { samples, sampleRate } = input;
  const analyzer = createLiveAnalyzer({ sampleRate });
  const earlier: VerdictStroke[] = (input.earlier ?? []).map((s, i) => ({
    contrastDb: s.contrastDb,
    flags: s.flags,
    startS: s.startS,
    index: i + 1,
  }));
  const judge = (list: Stroke[]) =>
    judgeSeat([
      ...earlier,
      ...list.map((s, i) => ({
        contrastDb: s.contrastDb,
        flags: s.flags,
        startS: s.startS,
        index: earlier.length + i + 1,
      })),
    ]);
  // Listening live stops at the stroke that settles the stage, unless it was settled already.
  const stopOnSettle = judgeSeat(earlier).state !== "settled";
  const strokes: Stroke[] = [];
  let retries = 0;
  let ignored = 0;
  let calibrated = false;
  let disturbed = false;
  let settledAt: number | null = null;
  let afterSettled = 0;

  const take = (events: ReturnType<typeof analyzer.push>) => {
    for (const ev of events) {
      if (ev.type === "calibrated") {
        if (ev.disturbed && retries < TAKE_CALIBRATION_RETRIES) {
          retries += 1;
          analyzer.startCalibration();
          continue;
        }
        calibrated = true;
        disturbed = ev.disturbed;
      } else if (ev.type === "stroke") {
        if (settledAt !== null) {
          afterSettled += 1;
          continue;
        }
        strokes.push(ev.stroke);
        if (stopOnSettle && judge(strokes).state === "settled") settledAt = strokes.length;
      } else if (ev.type === "rejected" && ev.sound.reason === "not-noise-like") {
        ignored += 1;
      }
    }
  };

  const step = Math.max(TAKE_BLOCK, Math.floor(samples.length / 50 / TAKE_BLOCK) * TAKE_BLOCK);
  for (let at = 0; at < samples.length; at += TAKE_BLOCK) {
    take(analyzer.push(samples.subarray(at, Math.min(at + TAKE_BLOCK, samples.length))));
    if (input.onProgress && at % step === 0) input.onProgress(at / samples.length);
  }
  take(analyzer.flush());
  input.onProgress?.(1);
  return {
    strokes,
    afterSettled,
    ignored,
    calibrationDisturbed: disturbed,
    calibrated,
    verdict: judge(strokes),
    durationS: samples.length / sampleRate,
  };
}
