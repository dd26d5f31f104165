// The bench screen's analysis Worker: the streaming stages of lib/audio, fed with the blocks
// the AudioWorklet gathers, posting strokes back as they complete.
import { createLiveAnalyzer, type LiveAnalyzer } from "@/lib/audio/live";
import type { FromWorker, ToWorker } from "@/lib/bench/worker-protocol";

let analyzer: LiveAnalyzer | null = null;
let blocks = 0;
let busyMs = 0;

const post = (m: FromWorker) => (self as unknown as Worker).postMessage(m);

function handle(msg: ToWorker) {
  try {
    switch (msg.type) {
      case "connect":
        // Audio blocks arrive on this port straight from the AudioWorklet.
        msg.port.onmessage = (ev: MessageEvent<Float32Array>) => handle({ type: "audio", samples: ev.data });
        return;
      case "init":
        analyzer = createLiveAnalyzer({ sampleRate: msg.sampleRate, noiseFloorDbfs: msg.noiseFloorDbfs });
        post({ type: "ready", sampleRate: msg.sampleRate });
        return;
      case "recalibrate":
        // Measure the room again without restarting the clock: stroke times stay on the recording's timeline.
        analyzer?.startCalibration();
        return;
      case "audio": {
        if (!analyzer) return;
        const t0 = performance.now();
        const events = analyzer.push(msg.samples);
        busyMs += performance.now() - t0;
        blocks += msg.samples.length / 128;
        for (const ev of events) {
          if (ev.type === "stroke") post({ ...ev, detectionMs: (analyzer.timeS - ev.stroke.endS) * 1000 });
          else post(ev);
        }
        if (blocks >= 375) {
          // Roughly once a second at 48 kHz: cost per 128-sample block, for the speed check.
          post({ type: "level", timeS: analyzer.timeS, blockMicros: (busyMs * 1000) / blocks });
          blocks = 0;
          busyMs = 0;
        }
        return;
      }
      case "flush":
        if (analyzer) {
          for (const ev of analyzer.flush()) {
            post(ev.type === "stroke" ? { ...ev, detectionMs: (analyzer.timeS - ev.stroke.endS) * 1000 } : ev);
          }
        }
        return;
    }
  } catch (err) {
    post({ type: "error", message: err instanceof Error ? err.message : String(err) });
  }
}

self.onmessage = (e: MessageEvent<ToWorker>) => handle(e.data);
