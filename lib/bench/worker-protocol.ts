// Messages between the bench screen and its analysis Worker.
import type { Stroke } from "@/lib/audio/analyzer";
import type { RejectedSound } from "@/lib/audio/strokes";

export type ToWorker =
  | { type: "init"; sampleRate: number; noiseFloorDbfs?: number }
  | { type: "audio"; samples: Float32Array }
  | { type: "connect"; port: MessagePort }
  | { type: "recalibrate" }
  | { type: "flush" };

export type FromWorker =
  | { type: "ready"; sampleRate: number }
  | { type: "calibrated"; noiseFloorDbfs: number; atS: number }
  // detectionMs: audio already analysed past the stroke's end when it was closed (the lift).
  | { type: "stroke"; stroke: Stroke; detectionMs: number }
  | { type: "rejected"; sound: RejectedSound }
  | { type: "level"; timeS: number; blockMicros: number }
  | { type: "error"; message: string };
