"use server";

// The done-checks recorded at the bench. Checks the session first, validates the form with zod,
// and leaves everything as it was when it refuses; on success it answers with the seat's
// done-checks as they now are, so the bench shows them without another request.
import { revalidatePath } from "next/cache";
import { getDb } from "@/db/client";
import { requireActor } from "@/lib/auth/guard";
import { DONE_CHECK_LABELS, DONE_CHECK_RESULT_LABELS, recordDoneCheck, type SeatDoneChecks } from "@/lib/bench/done-checks";
import { doneCheckSchema } from "@/lib/validations/done-checks";
import { actionFailure, type ActionState } from "./state";

export interface DoneCheckState extends ActionState {
  checks?: SeatDoneChecks;
}

const text = (f: FormData, k: string) => {
  const v = f.get(k);
  return typeof v === "string" ? v : undefined;
};

export async function saveDoneCheck(_prev: DoneCheckState, f: FormData): Promise<DoneCheckState> {
  try {
    const actor = await requireActor("jobs:work");
    const v = doneCheckSchema.parse({
      seatId: text(f, "seatId"),
      kind: text(f, "kind"),
      result: text(f, "result"),
      note: text(f, "note"),
      photoId: text(f, "photoId"),
    });
    const checks = await recordDoneCheck(await getDb(), actor, v);
    revalidatePath(`/jobs/${checks.jobId}`);
    revalidatePath(`/jobs/${checks.jobId}/report`);
    return {
      ok: true,
      message: `${DONE_CHECK_LABELS[v.kind]} on seat ${checks.code}: ${DONE_CHECK_RESULT_LABELS[v.result].toLowerCase()} recorded.`,
      fieldErrors: {},
      checks,
    };
  } catch (err) {
    return actionFailure(err);
  }
}
