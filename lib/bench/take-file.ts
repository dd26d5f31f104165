// The checks "Use a recording" makes on a picked file before decoding it: size, and kind by its
// first bytes (never by its name or the type the phone claims). Pure, so the phone and the tests
// share them.
import { MAX_RECORDING_BYTES, MAX_TAKE_SECONDS } from "@/lib/storage/limits";
import { isKeptRecording, sniff, type Sniffed } from "@/lib/storage/sniff";

export type TakeFileCheck = { ok: true; sniffed: Sniffed } | { ok: false; message: string };

const PICK_AGAIN = "Pick the m4a, MP3, Ogg or WAV file your phone's recorder made.";

export function checkTakeFile(
  file: { size: number; name: string },
  head: Uint8Array,
): TakeFileCheck {
  if (file.size === 0) return { ok: false, message: `“${file.name}” is empty. ${PICK_AGAIN}` };
  if (file.size > MAX_RECORDING_BYTES) {
    return {
      ok: false,
      message: `“${file.name}” is ${(file.size / 1048576).toFixed(0)} MB; recordings are limited to ${MAX_RECORDING_BYTES / 1048576} MB. Record the seat on its own, or use a shorter part.`,
    };
  }
  const sniffed = sniff(head);
  if (sniffed && isKeptRecording(sniffed)) return { ok: true, sniffed };
  const what =
    sniffed?.kind === "jpeg" ||
    sniffed?.kind === "png" ||
    sniffed?.kind === "webp" ||
    sniffed?.kind === "heic"
      ? "a photo"
      : sniffed
        ? `audio in a form Grindfade does not keep (${sniffed.kind === "ogg" ? `Ogg ${sniffed.codec ?? "of an unknown codec"}` : sniffed.kind})`
        : "not a sound recording Grindfade knows";
  return { ok: false, message: `“${file.name}” is ${what}. ${PICK_AGAIN}` };
}

export const UNDECODABLE = (name: string) =>
  `This phone could not decode “${name}”: it may be damaged or cut short, or the browser cannot play its codec. Export it again from the recorder app (m4a or WAV), or record on the bench screen.`;

export function checkTakeLength(name: string, durationS: number): string | null {
  if (!(durationS > 0)) return UNDECODABLE(name);
  if (durationS > MAX_TAKE_SECONDS) {
    return `“${name}” lasts ${Math.round(durationS / 60)} minutes; a recording used here may last ${MAX_TAKE_SECONDS / 60} minutes at most. Record the seat on its own.`;
  }
  if (durationS < 3)
    return `“${name}” lasts under 3 seconds: too short to measure the room and hear strokes. Record at least 2 seconds of quiet, then the lapping.`;
  return null;
}
