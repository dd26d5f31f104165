export default function Loading() {
  return (
    <div aria-busy="true" aria-label="Loading" className="flex flex-col gap-3">
      <div className="h-8 w-48 animate-pulse rounded bg-stone-200" />
      <div className="h-24 animate-pulse rounded-xl bg-stone-200" />
      <div className="h-64 animate-pulse rounded-xl bg-stone-200" />
    </div>
  );
}
