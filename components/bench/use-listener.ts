"use client";

// The microphone, the AudioWorklet that gathers its blocks, the analysis Worker and the
// optional compressed recording, wrapped for the bench screen.
import { useCallback, useEffect, useRef, useState } from "react";
import type { Stroke } from "@/lib/audio/analyzer";
import type { RejectedSound } from "@/lib/audio/strokes";
import { chooseRecordingType, RECORDING_PIECE_MS } from "@/lib/bench/recorder-type";
import { takeLockName, Takes } from "@/lib/bench/takes";
import type { FromWorker, ToWorker } from "@/lib/bench/worker-protocol";

export type ListenerPhase = "idle" | "starting" | "calibrating" | "listening" | "stopping";

/** How the last room measurement went when it heard something: measuring again, or kept its quiet part. */
export type CalibrationNote = "measuring-again" | "quieter" | "quiet-part" | null;

/** Room measurements taken again, at most, when each heard a sound, before keeping the quiet part. */
const CALIBRATION_RETRIES = 2;

export interface ListenerCallbacks {
  onStroke(stroke: Stroke, detectionMs: number): void;
  onRejected(sound: RejectedSound): void;
  onCalibrated(noiseFloorDbfs: number, disturbed: boolean): void;
  /**
   * The whole recording once listening stops. Its pieces are also kept in IndexedDB (Takes) as
   * they are made, under the session's id; the callback turns them into the session's recording.
   */
  onRecording(blob: Blob, type: string, sessionId: string | null): Promise<void> | void;
}

export interface ProcessingWarning {
  setting: "echoCancellation" | "noiseSuppression" | "autoGainControl";
  label: string;
}

const PROCESSING_LABELS: Record<ProcessingWarning["setting"], string> = {
  echoCancellation: "echo cancellation",
  noiseSuppression: "noise suppression",
  autoGainControl: "automatic gain",
};

export function explainMicrophoneError(err: unknown): string {
  const name = (err as { name?: string })?.name;
  if (name === "NotAllowedError" || name === "SecurityError") {
    return "Grindfade may not use the microphone. Allow the microphone for this site in the browser's settings (the lock or site icon beside the address), then tap Try again.";
  }
  if (name === "NotFoundError" || name === "OverconstrainedError") {
    return "No microphone was found. Plug in or enable a microphone, or use a phone, then tap Try again.";
  }
  if (name === "NotReadableError" || name === "AbortError") {
    return "The microphone is busy in another app (a call or a recorder). Close it, then tap Try again.";
  }
  return `The microphone could not be started (${err instanceof Error ? err.message : String(err)}). Reload the page and try again.`;
}

export function browserCanListen(): string | null {
  if (typeof window === "undefined") return null;
  if (!window.isSecureContext) return "Listening needs a secure (https) connection. Open Grindfade through its https address.";
  if (!navigator.mediaDevices?.getUserMedia) return "This browser cannot use the microphone. Use a current Chrome, Safari, Firefox or Edge.";
  if (typeof AudioWorkletNode === "undefined" || typeof Worker === "undefined") {
    return "This browser is too old to listen live. Use a current Chrome, Safari, Firefox or Edge.";
  }
  return null;
}

export function useListener(callbacks: ListenerCallbacks) {
  const cb = useRef(callbacks);
  useEffect(() => {
    cb.current = callbacks;
  });
  const [phase, setPhase] = useState<ListenerPhase>("idle");
  const [error, setError] = useState<string | null>(null);
  const [processing, setProcessing] = useState<ProcessingWarning[]>([]);
  const [sampleRate, setSampleRate] = useState<number | null>(null);
  const [blockMicros, setBlockMicros] = useState<number | null>(null);
  const [calibrationNote, setCalibrationNote] = useState<CalibrationNote>(null);
  const retries = useRef(0);
  const parts = useRef<{
    stream: MediaStream;
    ctx: AudioContext;
    node: AudioWorkletNode;
    worker: Worker;
    recorder: MediaRecorder | null;
    chunks: Blob[];
    /** Pieces still being written to IndexedDB, and the take's lock's release. */
    kept: { sessionId: string; writes: Promise<void>; release: () => void } | null;
    wakeLock: WakeLockSentinel | null;
  } | null>(null);

  const releaseWakeLock = () => {
    void parts.current?.wakeLock?.release().catch(() => {});
  };

  const start = useCallback(async (options: { record: boolean; noiseFloorDbfs?: number; take?: { sessionId: string; seatId: string } }) => {
    setError(null);
    setCalibrationNote(null);
    retries.current = 0;
    const unsupported = browserCanListen();
    if (unsupported) {
      setError(unsupported);
      return false;
    }
    setPhase("starting");
    let stream: MediaStream;
    try {
      stream = await navigator.mediaDevices.getUserMedia({
        audio: { echoCancellation: false, noiseSuppression: false, autoGainControl: false, channelCount: 1 },
      });
    } catch (err) {
      setError(explainMicrophoneError(err));
      setPhase("idle");
      return false;
    }
    try {
      const settings = stream.getAudioTracks()[0]?.getSettings() ?? {};
      setProcessing(
        (Object.keys(PROCESSING_LABELS) as ProcessingWarning["setting"][])
          .filter((k) => settings[k] === true)
          .map((k) => ({ setting: k, label: PROCESSING_LABELS[k] })),
      );
      const ctx = new AudioContext({ latencyHint: "interactive" });
      if (ctx.state === "suspended") await ctx.resume();
      await ctx.audioWorklet.addModule("/worklets/grindfade-capture.js");
      const source = ctx.createMediaStreamSource(stream);
      const node = new AudioWorkletNode(ctx, "grindfade-capture", {
        numberOfInputs: 1,
        numberOfOutputs: 1,
        // Small blocks keep the stroke-to-curve delay short; 256 samples is about 5 ms.
        processorOptions: { blockSize: 256 },
      });
      const mute = ctx.createGain();
      mute.gain.value = 0;
      source.connect(node).connect(mute).connect(ctx.destination);
      const worker = new Worker(new URL("./analysis.worker.ts", import.meta.url), { type: "module" });
      const post = (m: ToWorker, transfer: Transferable[] = []) => worker.postMessage(m, transfer);
      worker.onmessage = (e: MessageEvent<FromWorker>) => {
        const m = e.data;
        if (m.type === "calibrated") {
          if (m.disturbed && retries.current < CALIBRATION_RETRIES) {
            // A sound during "stay quiet": say so and measure again.
            retries.current += 1;
            setCalibrationNote("measuring-again");
            post({ type: "recalibrate" });
            return;
          }
          setCalibrationNote(m.disturbed ? "quiet-part" : null);
          setPhase("listening");
          cb.current.onCalibrated(m.noiseFloorDbfs, m.disturbed);
        } else if (m.type === "remeasuring") {
          setCalibrationNote("quieter");
          setPhase("calibrating");
        } else if (m.type === "stroke") cb.current.onStroke(m.stroke, m.detectionMs);
        else if (m.type === "rejected") cb.current.onRejected(m.sound);
        else if (m.type === "level") setBlockMicros(m.blockMicros);
        else if (m.type === "error") setError(`Analysis stopped: ${m.message}`);
      };
      post({ type: "init", sampleRate: ctx.sampleRate, noiseFloorDbfs: options.noiseFloorDbfs });
      const channel = new MessageChannel();
      post({ type: "connect", port: channel.port2 }, [channel.port2]);
      node.port.postMessage({ type: "connect", port: channel.port1 }, [channel.port1]);
      setSampleRate(ctx.sampleRate);

      let recorder: MediaRecorder | null = null;
      const chunks: Blob[] = [];
      let kept: { sessionId: string; writes: Promise<void>; release: () => void } | null = null;
      if (options.record && typeof MediaRecorder !== "undefined") {
        const type = chooseRecordingType((t) => MediaRecorder.isTypeSupported(t));
        const rec = new MediaRecorder(stream, type ? { mimeType: type, audioBitsPerSecond: 64000 } : undefined);
        recorder = rec;
        if (options.take) {
          const { sessionId, seatId } = options.take;
          // Held while this page records: a page that finds the lock free knows the take was left behind.
          let release = () => {};
          if (navigator.locks) {
            await new Promise<void>((held) => {
              void navigator.locks
                .request(takeLockName(sessionId), () => {
                  held();
                  return new Promise<void>((r) => (release = r));
                })
                .catch(() => held());
            });
          }
          const takes = new Takes();
          const keeping = { sessionId, writes: Promise.resolve(), release: () => release() };
          kept = keeping;
          let seq = 0;
          rec.ondataavailable = (e) => {
            if (!e.data.size) return;
            chunks.push(e.data);
            const piece = { sessionId, seatId, seq: seq++, type: rec.mimeType || type || "audio/webm", blob: e.data };
            // Written at once, one after another: a reload loses at most the piece being made.
            keeping.writes = keeping.writes.then(() => takes.append(piece)).catch(() => {});
          };
        } else {
          rec.ondataavailable = (e) => e.data.size && chunks.push(e.data);
        }
        rec.start(RECORDING_PIECE_MS);
      }
      let wakeLock: WakeLockSentinel | null = null;
      try {
        wakeLock = (await navigator.wakeLock?.request("screen")) ?? null;
      } catch {
        wakeLock = null;
      }
      parts.current = { stream, ctx, node, worker, recorder, chunks, kept, wakeLock };
      setPhase(options.noiseFloorDbfs !== undefined ? "listening" : "calibrating");
      return true;
    } catch (err) {
      stream.getTracks().forEach((t) => t.stop());
      setError(`Listening could not start: ${err instanceof Error ? err.message : String(err)}`);
      setPhase("idle");
      return false;
    }
  }, []);

  const stop = useCallback(async () => {
    const p = parts.current;
    if (!p) return;
    setPhase("stopping");
    p.node.port.postMessage("flush");
    await new Promise((r) => setTimeout(r, 60));
    // Let the Worker close a stroke that was still sounding, and hear back from it.
    p.worker.postMessage({ type: "flush" } satisfies ToWorker);
    await new Promise((r) => setTimeout(r, 150));
    if (p.recorder && p.recorder.state !== "inactive") {
      await new Promise<void>((resolve) => {
        p.recorder!.onstop = () => resolve();
        p.recorder!.stop();
      });
      const type = p.recorder.mimeType || "audio/webm";
      await p.kept?.writes;
      if (p.chunks.length) await Promise.resolve(cb.current.onRecording(new Blob(p.chunks, { type }), type, p.kept?.sessionId ?? null)).catch(() => {});
    }
    p.kept?.release();
    p.stream.getTracks().forEach((t) => t.stop());
    p.worker.terminate();
    await p.ctx.close().catch(() => {});
    releaseWakeLock();
    parts.current = null;
    setPhase("idle");
  }, []);

  const recalibrate = useCallback(() => {
    const p = parts.current;
    if (!p) return;
    p.worker.postMessage({ type: "recalibrate" } satisfies ToWorker);
    retries.current = 0;
    setCalibrationNote(null);
    setPhase("calibrating");
  }, []);

  // The wake lock is dropped when the page is hidden; take it again on return.
  useEffect(() => {
    const onVisible = async () => {
      const p = parts.current;
      if (p && document.visibilityState === "visible") {
        try {
          p.wakeLock = (await navigator.wakeLock?.request("screen")) ?? null;
        } catch {
          /* not granted: the screen may dim */
        }
      }
    };
    document.addEventListener("visibilitychange", onVisible);
    return () => document.removeEventListener("visibilitychange", onVisible);
  }, []);

  useEffect(
    () => () => {
      const p = parts.current;
      if (p) {
        // Leaving the screen while recording: the take stays in IndexedDB for the next visit.
        p.kept?.release();
        p.stream.getTracks().forEach((t) => t.stop());
        p.worker.terminate();
        void p.ctx.close().catch(() => {});
      }
    },
    [],
  );

  return { phase, error, processing, sampleRate, blockMicros, calibrationNote, start, stop, recalibrate, setError };
}
