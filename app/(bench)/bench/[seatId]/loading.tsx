export default function Loading() {
  return (
    <div aria-busy="true" aria-label="Loading the seat" className="mx-auto flex max-w-3xl flex-col gap-3 p-4">
      <div className="h-20 w-40 animate-pulse rounded bg-stone-200" />
      <div className="h-14 animate-pulse rounded-xl bg-stone-200" />
      <div className="h-32 animate-pulse rounded-2xl bg-stone-300" />
      <div className="h-56 animate-pulse rounded-2xl bg-stone-200" />
    </div>
  );
}
