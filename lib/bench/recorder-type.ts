// Which compressed format the bench screen records in, chosen from what the browser's
// MediaRecorder says it can write. Opus in WebM first (Chrome, Edge, Android, recent Safari),
// then AAC in MP4 (Safari on iPhones and Macs), then Opus in Ogg (Firefox). All three are kept
// by the recording upload (lib/storage/sniff.ts) and play in listen-back.
export const RECORDING_TYPES = [
  "audio/webm;codecs=opus",
  "audio/mp4;codecs=mp4a.40.2",
  "audio/mp4",
  "audio/ogg;codecs=opus",
] as const;

/** The first type the browser can record, or undefined to let it choose its own default. */
export function chooseRecordingType(
  isTypeSupported: (type: string) => boolean,
): string | undefined {
  return RECORDING_TYPES.find((t) => {
    try {
      return isTypeSupported(t);
    } catch {
      return false;
    }
  });
}

/** A piece of recording every second: a reload or crash loses at most about this much. */
export const RECORDING_PIECE_MS = 1000;
