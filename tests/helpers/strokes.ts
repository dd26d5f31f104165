// One invented stroke as the bench screen sends it: two seconds per stroke, 1.4 s of sound,
// the onset `contrastDb` above a body at −30 dBFS. Shared by the tests and the server scripts.
import { randomUUID } from "node:crypto";
import type { StrokeInput } from "@/lib/validations/bench";

export function syntheticStroke(index: number, contrastDb: number): StrokeInput {
  return {
    clientId: randomUUID(),
    index,
    startS: 2 * index,
    endS: 2 * index + 1.4,
    onsetDb: -30 + contrastDb,
    bodyDb: -30,
    contrastDb,
    flags: [],
  };
}
