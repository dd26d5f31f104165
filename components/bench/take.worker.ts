// Analyses a recording made with another app, off the page's thread: the same live analyzer the
// listening Worker runs (lib/bench/analyze-take.ts), fed the decoded samples.
import { analyzeTake, type TakeAnalysis } from "@/lib/bench/analyze-take";

export type ToTakeWorker = {
  samples: Float32Array;
  sampleRate: number;
  earlier: Array<{ contrastDb: number; flags: string[]; startS: number }>;
};
export type FromTakeWorker =
  | { type: "ready" }
  | { type: "progress"; done: number }
  | { type: "done"; result: TakeAnalysis }
  | { type: "error"; message: string };

const post = (m: FromTakeWorker) => (self as unknown as Worker).postMessage(m);

self.onmessage = (e: MessageEvent<ToTakeWorker>) => {
  try {
    const result = analyzeTake({
      ...e.data,
      onProgress: (done) => post({ type: "progress", done }),
    });
    post({ type: "done", result });
  } catch (err) {
    post({ type: "error", message: err instanceof Error ? err.message : String(err) });
  }
};

// The page sends the recording only once this module runs: a message posted while the worker's
// chunks were still loading would find no handler.
post({ type: "ready" });
