"use client";

// The bench screen's done-checks section: once the seat has settled in fine compound, the checks
// besides the sound — the contact ring (with its width from the seat's measurements), a
// marking-compound contact test and a solvent leak test of the seat's port — each recorded as pass
// or fail with an optional note and photo. Open by itself after fine settles; reachable any time.
import {
  startTransition,
  useActionState,
  useCallback,
  useEffect,
  useState,
  type FormEvent,
} from "react";
import { saveDoneCheck, type DoneCheckState } from "@/lib/actions/done-checks";
import type { SeatDoneChecks } from "@/lib/bench/done-checks";
import {
  DONE_CHECK_KINDS,
  DONE_CHECK_LABELS,
  type DoneCheckKind,
} from "@/lib/bench/done-check-words";
import { DoneChecksSummary, widthLine } from "./done-checks-summary";

const initial: DoneCheckState = { ok: false, message: null, fieldErrors: {} };

function HowTo({ kind, checks }: { kind: DoneCheckKind; checks: SeatDoneChecks }) {
  switch (kind) {
    case "contact_ring":
      return (
        <>
          <p>
            An even, dull-grey band all the way round on the valve face and the seat: no bright
            spots, no break, no dark patches.
          </p>
          <p className="text-stone-700" data-testid="ring-width">
            {widthLine(checks.width)}
          </p>
          {checks.width.measuredMm === null ? (
            <p>
              Measure it on the{" "}
              <a
                href={`/jobs/${checks.jobId}/measurements`}
                className="inline-flex min-h-11 items-center font-semibold text-brass-dark underline"
              >
                measurements sheet
              </a>
              . Typically about 1.0–1.6 mm on intake seats and 1.2–2.2 mm on exhaust seats, varying
              by engine (service manuals): the engine maker&apos;s figure decides.
            </p>
          ) : null}
        </>
      );
    case "marking_compound":
      return (
        <p>
          A thin coat of marking compound on the valve face, the valve dropped into its seat and
          turned a little under light pressure, then lifted out: the contact must be even and
          unbroken all the way round (common practice).
        </p>
      );
    case "leak_test":
      return (
        <>
          <p>
            With the valves in and sprung, pour solvent into the{" "}
            <span className="font-semibold">{checks.port}</span> and watch the chamber side of this
            seat: no seepage (common practice).
          </p>
          <p
            className="rounded-lg bg-amber-100 px-2 py-1 text-amber-950"
            data-testid="solvent-cautions"
          >
            Solvent is flammable: no flames or sparks, work with ventilation, wear nitrile gloves
            and eye protection (OSHA 29 CFR 1910.133).
          </p>
        </>
      );
  }
}

export function DoneChecks({
  seatId,
  canWork,
  settled,
}: {
  seatId: string;
  canWork: boolean;
  settled: boolean;
}) {
  const [checks, setChecks] = useState<SeatDoneChecks | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  // A lost connection is answered here: the bench screen stays up and says nothing was recorded.
  const [state, action, saving] = useActionState(
    async (prev: DoneCheckState, data: FormData): Promise<DoneCheckState> => {
      try {
        const answer = await saveDoneCheck(prev, data);
        // The seat's done-checks as they now are, kept whatever the next answer says.
        if (answer.ok && answer.checks) setChecks(answer.checks);
        return answer;
      } catch {
        return {
          ok: false,
          message:
            "Not recorded: the server could not be reached. Try again when the phone is back online.",
          fieldErrors: {},
        };
      }
    },
    initial,
  );
  const [lastKind, setLastKind] = useState<DoneCheckKind | null>(null);
  const [uploading, setUploading] = useState(false);
  const [uploadError, setUploadError] = useState<string | null>(null);

  const load = useCallback(async () => {
    try {
      const res = await fetch(`/api/seats/${seatId}/checks`, {
        headers: { accept: "application/json" },
      });
      const body = (await res.json().catch(() => null)) as
        (SeatDoneChecks & { message?: string }) | null;
      if (!res.ok || !body) throw new Error(body?.message ?? `HTTP ${res.status}`);
      setChecks(body);
      setLoadError(null);
    } catch (err) {
      setLoadError(
        `The done-checks could not be loaded: ${err instanceof Error ? err.message : String(err)}`,
      );
    }
  }, [seatId]);

  useEffect(() => {
    void (async () => {
      await load();
    })();
  }, [load]);

  const shown = checks;

  async function submit(e: FormEvent<HTMLFormElement>, kind: DoneCheckKind) {
    e.preventDefault();
    const form = e.currentTarget;
    const submitter = (e.nativeEvent as SubmitEvent).submitter as HTMLButtonElement | null;
    const data = new FormData(form, submitter);
    const file = data.get("photo");
    data.delete("photo");
    setLastKind(kind);
    setUploadError(null);
    // The photo goes up first, through the seat's photo upload; the check then points at it.
    if (file instanceof File && file.size > 0) {
      setUploading(true);
      try {
        const res = await fetch(`/api/seats/${seatId}/photos`, {
          method: "POST",
          headers: { "content-type": file.type || "application/octet-stream" },
          body: file,
        });
        const body = (await res.json().catch(() => ({}))) as { id?: string; message?: string };
        if (!res.ok || !body.id) throw new Error(body.message ?? `HTTP ${res.status}`);
        data.set("photoId", body.id);
      } catch (err) {
        setUploadError(
          `The photo was not saved, so the check was not recorded: ${err instanceof Error ? err.message : String(err)}`,
        );
        return;
      } finally {
        setUploading(false);
      }
    }
    startTransition(() => action(data));
  }

  // A saved check clears its form; a refused one keeps what was typed.
  useEffect(() => {
    if (state.ok && lastKind)
      (
        document.getElementById(`done-check-${seatId}-${lastKind}`) as HTMLFormElement | null
      )?.reset();
  }, [state, lastKind, seatId]);

  const passed = shown
    ? DONE_CHECK_KINDS.filter((k) => shown.latest[k]?.result === "pass").length
    : 0;
  const busy = saving || uploading;

  return (
    <details
      className="rounded-xl border border-stone-300 bg-white p-3"
      open={settled}
      data-testid="done-checks"
    >
      <summary className="flex min-h-11 cursor-pointer items-center justify-between gap-2 font-semibold">
        <span>Done-checks</span>
        <span className="text-sm font-normal text-stone-600" data-testid="done-checks-count">
          {shown ? `${passed} of 3 passed` : "…"}
        </span>
      </summary>
      <p className="mt-1 text-sm text-stone-600">
        The sound says when to stop lapping; these say the seat seals. Clean off every trace of
        compound first.
      </p>
      {loadError ? (
        <div role="alert" className="mt-2 rounded-lg bg-rose-100 px-3 py-2 text-sm text-rose-900">
          <p>{loadError}</p>
          <button
            type="button"
            onClick={() => void load()}
            className="mt-1 min-h-11 rounded-lg border border-rose-400 bg-white px-3 font-semibold"
          >
            Try again
          </button>
        </div>
      ) : null}
      {!shown ? (
        loadError ? null : (
          <div className="mt-2 h-24 animate-pulse rounded bg-stone-200" />
        )
      ) : (
        <div className="mt-2 flex flex-col gap-3">
          <DoneChecksSummary checks={shown} testId="bench-done-checks" />
          {state.message ? (
            <p
              aria-live="polite"
              role={state.ok ? "status" : "alert"}
              className={`rounded-lg px-3 py-2 text-sm font-semibold ${state.ok ? "bg-emerald-100 text-emerald-900" : "bg-rose-100 text-rose-900"}`}
              data-testid="done-check-message"
            >
              {state.message}
            </p>
          ) : null}
          {uploadError ? (
            <p
              role="alert"
              className="rounded-lg bg-rose-100 px-3 py-2 text-sm font-semibold text-rose-900"
            >
              {uploadError}
            </p>
          ) : null}
          {canWork
            ? DONE_CHECK_KINDS.map((kind) => {
                const errors = lastKind === kind && !state.ok ? state.fieldErrors : {};
                const noteError = errors.note?.[0] ?? errors.photoId?.[0];
                const formId = `done-check-${seatId}-${kind}`;
                const recorded = shown.latest[kind];
                // A check with a record that counts folds away; it can still be recorded again.
                return (
                  <details
                    key={kind}
                    open={!recorded || Boolean(noteError)}
                    className="rounded-lg border border-stone-200 p-2 text-sm"
                  >
                    <summary className="flex min-h-11 cursor-pointer items-center font-semibold">
                      {DONE_CHECK_LABELS[kind]}
                      {recorded ? (
                        <span className="ml-2 font-normal text-stone-600">— record again</span>
                      ) : null}
                    </summary>
                    <form
                      id={formId}
                      onSubmit={(e) => void submit(e, kind)}
                      className="flex flex-col gap-2"
                      aria-label={DONE_CHECK_LABELS[kind]}
                      data-testid={`done-check-form-${kind}`}
                    >
                      <input type="hidden" name="seatId" value={seatId} />
                      <input type="hidden" name="kind" value={kind} />
                      <HowTo kind={kind} checks={shown} />
                      <label className="flex flex-col gap-1">
                        Note (optional)
                        <input
                          name="note"
                          maxLength={500}
                          aria-invalid={Boolean(noteError)}
                          aria-describedby={noteError ? `${formId}-error` : undefined}
                          className={`min-h-11 rounded-lg border px-2 ${noteError ? "border-2 border-rose-600" : "border-stone-400"}`}
                        />
                      </label>
                      <label className="flex flex-col gap-1">
                        Photo (optional)
                        <input
                          name="photo"
                          type="file"
                          accept="image/jpeg,image/png,image/webp"
                          capture="environment"
                          className="min-h-11 w-full min-w-0 max-w-full text-sm"
                        />
                      </label>
                      {noteError ? (
                        <p id={`${formId}-error`} className="text-rose-700">
                          {noteError}
                        </p>
                      ) : null}
                      <div className="grid grid-cols-2 gap-2">
                        <button
                          type="submit"
                          name="result"
                          value="pass"
                          disabled={busy}
                          className="min-h-12 rounded-lg bg-emerald-700 font-semibold text-white disabled:opacity-60"
                        >
                          Pass
                        </button>
                        <button
                          type="submit"
                          name="result"
                          value="fail"
                          disabled={busy}
                          className="min-h-12 rounded-lg border-2 border-rose-700 bg-white font-semibold text-rose-800 disabled:opacity-60"
                        >
                          Fail
                        </button>
                      </div>
                    </form>
                  </details>
                );
              })
            : null}
        </div>
      )}
    </details>
  );
}
