// The bench screen's side of working offline: register the offline worker (public/bench-sw.js)
// and tell it which page this is and which files the page has loaded so far. All the caching
// logic lives in the worker, not in the page's bundle.
export function keepOfflineCopy(): void {
  if (process.env.NODE_ENV !== "production" || !("serviceWorker" in navigator)) return;
  navigator.serviceWorker
    .register("/bench-sw.js", { scope: "/" })
    .then(() => navigator.serviceWorker.ready)
    .then((r) =>
      r.active?.postMessage({ type: "keep", path: location.pathname, assets: performance.getEntriesByType("resource").map((e) => e.name) }),
    )
    .catch(() => {
      /* no offline copy: the screen still works online, and queued strokes still wait in IndexedDB */
    });
}

/** Hands the offline worker the screen's up-to-date copy of the seat, to show after an offline reload. */
export function keepSeatCopy(report: { seat: { id: string } }): void {
  if (process.env.NODE_ENV !== "production" || !("serviceWorker" in navigator)) return;
  navigator.serviceWorker.controller?.postMessage({ type: "seat", seatId: report.seat.id, json: JSON.stringify(report) });
}
