"use client";

// How far this seat's recordings are on their way to the server, read from the outbox as it
// sends them in chunks.
import { useEffect, useState } from "react";
import type { Outbox, UploadProgress } from "@/lib/bench/outbox";

const kb = (bytes: number) =>
  bytes >= 1024 * 1024
    ? `${(bytes / (1024 * 1024)).toFixed(1)} MB`
    : `${Math.max(1, Math.round(bytes / 1024))} kB`;

/** A finished upload stays on screen this long, so the technician sees it went. */
const DONE_SHOWN_MS = 6000;

export function RecordingUploads({ outbox, seatId }: { outbox: () => Outbox; seatId: string }) {
  const [uploads, setUploads] = useState<Record<string, UploadProgress>>({});
  useEffect(() => {
    const timers = new Set<ReturnType<typeof setTimeout>>();
    const off = outbox().onUploadProgress((p) => {
      if (p.seatId !== seatId) return;
      setUploads((u) => ({ ...u, [p.sessionId]: p }));
      if (p.state === "done") {
        const t = setTimeout(() => {
          timers.delete(t);
          setUploads((u) => {
            if (u[p.sessionId]?.state !== "done") return u;
            const { [p.sessionId]: _gone, ...rest } = u;
            return rest;
          });
        }, DONE_SHOWN_MS);
        timers.add(t);
      }
    });
    return () => {
      off();
      timers.forEach(clearTimeout);
    };
  }, [outbox, seatId]);

  const list = Object.values(uploads);
  if (!list.length) return null;
  return (
    <ul className="flex flex-col gap-1" aria-label="Recording uploads">
      {list.map((u) => {
        const pct = u.total ? Math.round((100 * u.received) / u.total) : 0;
        return (
          <li
            key={u.sessionId}
            className="rounded-lg bg-white px-3 py-2 text-sm"
            data-testid="recording-upload"
            data-state={u.state}
            data-percent={pct}
          >
            <div className="flex justify-between gap-2">
              <span className="font-semibold">
                {u.state === "done"
                  ? "Recording uploaded"
                  : u.state === "stopped"
                    ? "Recording upload paused — it goes on by itself"
                    : "Uploading the recording"}
              </span>
              <span className="figure">
                {pct} % · {kb(u.received)} of {kb(u.total)}
              </span>
            </div>
            <progress
              className="mt-1 h-2 w-full accent-emerald-700"
              max={u.total || 1}
              value={u.received}
              aria-label="Recording upload"
            />
          </li>
        );
      })}
    </ul>
  );
}
