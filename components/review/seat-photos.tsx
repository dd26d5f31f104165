"use client";

// Photos of the lapped contact ring on face and seat, taken with the phone's camera. Shown on
// the bench screen (with the button to add one) and on the review page.
import { useCallback, useEffect, useRef, useState } from "react";
import { useShopTimeZone } from "@/components/shop-time-zone";
import { formatWhen } from "@/lib/dates";
import { sendWithProgress } from "@/lib/storage/send-with-progress";

interface Photo {
  id: string;
  url?: string;
  createdAt: string;
}

export function SeatPhotos({ seatId, canAdd }: { seatId: string; canAdd: boolean }) {
  const timeZone = useShopTimeZone();
  const [photos, setPhotos] = useState<Photo[] | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [progress, setProgress] = useState<{ sent: number; total: number } | null>(null);
  const input = useRef<HTMLInputElement>(null);

  const load = useCallback(async () => {
    try {
      const res = await fetch(`/api/seats/${seatId}/photos`);
      const body = (await res.json()) as { photos?: Photo[]; message?: string };
      if (!res.ok) throw new Error(body.message ?? `HTTP ${res.status}`);
      setPhotos(body.photos ?? []);
    } catch (err) {
      setPhotos([]);
      setMessage(`Photos could not be loaded: ${err instanceof Error ? err.message : String(err)}`);
    }
  }, [seatId]);

  useEffect(() => {
    let live = true;
    void (async () => {
      if (live) await load();
    })();
    return () => {
      live = false;
    };
  }, [load]);

  async function upload(file: File) {
    setBusy(true);
    setMessage(null);
    try {
      setProgress({ sent: 0, total: file.size });
      const res = await sendWithProgress(
        `/api/seats/${seatId}/photos`,
        { method: "POST", headers: { "content-type": file.type || "application/octet-stream" }, body: file },
        (sent, total) => setProgress({ sent, total }),
      );
      if (!res.ok) throw new Error(typeof res.body.message === "string" ? res.body.message : `HTTP ${res.status}`);
      // The message shows once the list holds the new photo.
      await load();
      setMessage("Photo saved.");
    } catch (err) {
      setMessage(`Not saved: ${err instanceof Error ? err.message : String(err)}`);
    } finally {
      setBusy(false);
      setProgress(null);
      if (input.current) input.current.value = "";
    }
  }

  return (
    <section aria-label="Contact ring photos" className="rounded-xl border border-stone-300 bg-white p-3" data-testid="seat-photos">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 className="font-semibold">Contact ring photos</h2>
        {canAdd ? (
          <label className={`inline-flex min-h-12 cursor-pointer items-center rounded-lg border-2 border-ink px-4 font-semibold ${busy ? "opacity-60" : ""}`}>
            {busy ? "Saving…" : "Add photo"}
            <input
              ref={input}
              type="file"
              accept="image/jpeg,image/png,image/webp"
              capture="environment"
              className="sr-only"
              disabled={busy}
              onChange={(e) => {
                const f = e.target.files?.[0];
                if (f) void upload(f);
              }}
            />
          </label>
        ) : null}
      </div>
      <p className="text-sm text-stone-600">An even, dull grey ring all the way round on the face and the seat; photograph both.</p>
      {progress ? (
        <p className="mt-1 text-sm" data-testid="photo-progress" data-percent={progress.total ? Math.round((100 * progress.sent) / progress.total) : 0}>
          Uploading the photo: <span className="figure">{progress.total ? Math.round((100 * progress.sent) / progress.total) : 0} %</span>
          <progress className="mt-1 block h-2 w-full accent-emerald-700" max={progress.total || 1} value={progress.sent} aria-label="Photo upload" />
        </p>
      ) : null}
      {message ? (
        <p aria-live="polite" className="mt-1 text-sm" data-testid="photo-message">
          {message}
        </p>
      ) : null}
      {photos === null ? (
        <div className="mt-2 h-20 animate-pulse rounded bg-stone-200" />
      ) : photos.length === 0 ? (
        <p className="mt-2 text-sm text-stone-500">No photos yet.</p>
      ) : (
        <ul className="mt-2 grid grid-cols-3 gap-2 sm:grid-cols-5">
          {photos.map((p) => (
            <li key={p.id}>
              <a href={`/api/photos/${p.id}`} target="_blank" rel="noreferrer">
                {/* Plain img: the photos are private, served by our own route with the session cookie. */}
                {/* eslint-disable-next-line @next/next/no-img-element */}
                <img src={`/api/photos/${p.id}`} alt={`Contact ring photo taken ${formatWhen(p.createdAt, timeZone)}`} className="aspect-square w-full rounded object-cover" />
              </a>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
