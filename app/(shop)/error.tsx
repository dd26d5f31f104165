"use client";

export default function ShopError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div role="alert" className="mx-auto max-w-lg rounded-xl border border-rose-300 bg-rose-50 p-6">
      <h1 className="text-xl font-semibold text-rose-900">This page could not be loaded</h1>
      <p className="mt-2 text-rose-900">
        Something went wrong on the server. Your saved work is safe. Try again; if it keeps happening, tell your admin
        {error.digest ? (
          <>
            {" "}
            and quote <span className="figure">{error.digest}</span>
          </>
        ) : null}
        .
      </p>
      <button type="button" onClick={reset} className="mt-4 min-h-12 rounded-lg bg-ink px-5 font-semibold text-white">
        Try again
      </button>
    </div>
  );
}
