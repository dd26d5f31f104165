"use client";

import { useActionState } from "react";
import { saveValveIdentity, saveValveMove } from "@/lib/actions/sheets";
import { initialActionState } from "@/lib/actions/state";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-2 text-base";

export interface ValveRow {
  valveId: string;
  tag: string;
  partNumber: string | null;
  serial: string | null;
  seatId: string;
  seatCode: string;
  kind: "intake" | "exhaust";
  lappedInCode: string | null;
}

function ValveEditor({ jobId, v, seats, closed }: { jobId: string; v: ValveRow; seats: Array<{ id: string; code: string; kind: string }>; closed: boolean }) {
  const [idState, idAction, idPending] = useActionState(saveValveIdentity, initialActionState);
  const [mvState, mvAction, mvPending] = useActionState(saveValveMove, initialActionState);
  return (
    <li className="rounded-xl border border-stone-300 bg-white p-3" data-testid="valve-row" data-valve={v.tag}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <span>
          Seat <span className="figure font-bold">{v.seatCode}</span> holds valve <span className="figure font-bold">{v.tag}</span>
        </span>
        {v.lappedInCode ? (
          <span className="rounded-full bg-teal-700 px-2.5 py-1 text-xs font-semibold text-white">Lapped into {v.lappedInCode} — stays there</span>
        ) : (
          <span className="rounded-full bg-stone-100 px-2.5 py-1 text-xs">Not lapped yet: may be swapped</span>
        )}
      </div>
      {!closed ? (
        <div className="mt-2 grid grid-cols-1 gap-2 md:grid-cols-2">
          <form action={idAction} className="grid grid-cols-3 gap-2">
            <input type="hidden" name="jobId" value={jobId} />
            <input type="hidden" name="valveId" value={v.valveId} />
            <label className="flex flex-col text-xs font-semibold">
              Tag
              <input name="tag" defaultValue={v.tag} className={`${field} figure`} />
            </label>
            <label className="flex flex-col text-xs font-semibold">
              Part no.
              <input name="partNumber" defaultValue={v.partNumber ?? ""} className={`${field} figure`} />
            </label>
            <label className="flex flex-col text-xs font-semibold">
              Serial
              <input name="serial" defaultValue={v.serial ?? ""} className={`${field} figure`} />
            </label>
            <div className="col-span-3 flex items-center gap-2">
              <button type="submit" disabled={idPending} className="min-h-12 rounded-lg border border-stone-500 px-3 font-semibold">
                Save identity
              </button>
              <span aria-live="polite" className={`text-sm ${idState.ok ? "text-emerald-800" : "text-rose-700"}`}>
                {idState.fieldErrors.tag?.[0] ?? idState.message}
              </span>
            </div>
          </form>
          <form action={mvAction} className="flex flex-wrap items-end gap-2">
            <input type="hidden" name="jobId" value={jobId} />
            <input type="hidden" name="valveId" value={v.valveId} />
            <label className="flex flex-col text-xs font-semibold">
              Move to seat
              <select name="toSeatId" defaultValue={v.seatId} className={field}>
                {seats
                  .filter((s) => s.kind === v.kind)
                  .map((s) => (
                    <option key={s.id} value={s.id}>
                      {s.code}
                    </option>
                  ))}
              </select>
            </label>
            <button type="submit" disabled={mvPending} className="min-h-12 rounded-lg border border-stone-500 px-3 font-semibold">
              Move / swap
            </button>
            <span role={mvState.ok ? undefined : "alert"} aria-live="polite" className={`w-full text-sm ${mvState.ok ? "text-emerald-800" : "text-rose-700"}`} data-testid="valve-move-message">
              {mvState.message}
            </span>
          </form>
        </div>
      ) : null}
    </li>
  );
}

export function ValveList({ jobId, valves, seats, closed }: { jobId: string; valves: ValveRow[]; seats: Array<{ id: string; code: string; kind: string }>; closed: boolean }) {
  if (valves.length === 0) return <p className="text-stone-600">No valves recorded for this head.</p>;
  return (
    <ul className="flex flex-col gap-2">
      {valves.map((v) => (
        <ValveEditor key={v.valveId} jobId={jobId} v={v} seats={seats} closed={closed} />
      ))}
    </ul>
  );
}
