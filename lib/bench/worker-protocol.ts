// Messages between the bench screen and its analysis Worker.
import type { Stroke } from "@/lib/audio/analyzer";
import type { NoiseFloors } from "@/lib/audio/floors";
import type { RejectedSound } from "@/lib/audio/strokes";

export type ToWorker =
  | { type: "init"; sampleRate: number; noiseFloorDbfs?: number }
  | { type: "audio"; samples: Float32Array }
  | { type: "connect"; port: MessagePort }
  | { type: "recalibrate" }
  | { type: "flush" };

export type FromWorker =
  | { type: "ready"; sampleRate: number }
  // disturbed: something sounded during "stay quiet"; the floors come from its quiet part.
  // The room turned out quieter than measured (lapping had begun during "stay quiet"): measuring again.
  | { type: "remeasuring"; atS: number }
  | { type: "calibrated"; noiseFloorDbfs: number; noiseFloors: NoiseFloors; disturbed: boolean; atS: number }
  // detectionMs: audio already analysed past the stroke's end when it was closed (the lift).
  | { type: "stroke"; stroke: Stroke; detectionMs: number }
  | { type: "rejected"; sound: RejectedSound }
  | { type: "level"; timeS: number; blockMicros: number }
  | { type: "error"; message: string };
