// What the customer's report means, in a car owner's words: shared by the public page and the PDF
// so both explain the same figures the same way.
import type { SeatState } from "@/db/schema";

export const REPORT_EXPLAINED: Array<{ term: string; text: string }> = [
  {
    term: "Lapping",
    text:
      "Each valve is ground against its seat in the cylinder head with a fine paste, by hand, until the two meet in an even, unbroken ring. " +
      "That ring is what keeps the compression in the cylinder. It is done first with a coarse paste and then with a fine one.",
  },
  {
    term: "Onset contrast",
    text:
      "While a seat is lapped we listen to it. At the start of every stroke the rough spots give a short, sharp scratch; " +
      "the onset contrast is how much louder that scratch is than the rest of the stroke, in decibels (dB). " +
      "A seat that is still rough scratches loudly; as the surfaces come to match, the scratch dies away and the contrast falls towards zero.",
  },
  {
    term: "Fade curve",
    text:
      "The onset contrast of every stroke, one after the other. On a good seat it starts high and falls, then levels out near zero: " +
      "the sound has faded because there is nothing left to grind away.",
  },
  {
    term: "Settled at stroke 12",
    text:
      "The stroke at which the seat counted as finished: from there on, four strokes in a row were all quiet (no more than 1.5 dB of contrast) " +
      "and no longer getting quieter. Lapping stops there, because more grinding would only widen the ring. " +
      "A lower number is not better or worse; it says how much work that seat needed.",
  },
  {
    term: "Journal clearance",
    text:
      "The small gap, a few hundredths of a millimetre, between each camshaft journal and its bearing, filled with oil when the engine runs. " +
      "It is checked against the engine maker's figures.",
  },
  {
    term: "Cap torque",
    text:
      "The camshaft bearing caps are bolted down in a set order and in stages to the maker's tightening figure (in newton-metres, N·m), " +
      "so the camshaft turns freely and the caps sit evenly.",
  },
];

/** A seat's state in the customer's words. */
export const SEAT_STATE_WORDS: Record<SeatState, string> = {
  waiting: "Not lapped yet",
  lapping: "Being lapped",
  settled: "Lapped, awaiting the supervisor's check",
  stalled: "Stopped improving: to be looked at again",
  approved: "Lapped and checked by the supervisor",
  sent_back: "Sent back for more work",
};

/** The seat code ("2I1": cylinder 2, intake, first valve) in words. */
export function seatWords(s: { cylinder: number; kind: "intake" | "exhaust"; code: string }): string {
  return `cylinder ${s.cylinder}, ${s.kind} valve ${s.code.slice(-1)}`;
}

export const REFIT_CAUTION = "Refit the head to the engine maker's figures and tightening order; loosen in reverse.";
