import Link from "next/link";

export default function JobNotFound() {
  return (
    <div className="mx-auto max-w-md rounded-xl border border-stone-300 bg-white p-6 text-center">
      <h1 className="text-xl font-semibold">No such job</h1>
      <p className="mt-2 text-stone-600">This job does not exist in your shop, or it was removed.</p>
      <Link href="/jobs" className="mt-4 inline-flex min-h-12 items-center rounded-lg bg-ink px-5 font-semibold text-white">
        Back to the jobs board
      </Link>
    </div>
  );
}
