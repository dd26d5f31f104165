export default function Loading() {
  return (
    <div aria-busy="true" aria-label="Loading the session" className="flex flex-col gap-3">
      <div className="h-8 w-56 animate-pulse rounded bg-stone-200" />
      <div className="h-40 animate-pulse rounded-xl bg-stone-200" />
      <div className="h-56 animate-pulse rounded-xl bg-stone-200" />
    </div>
  );
}
