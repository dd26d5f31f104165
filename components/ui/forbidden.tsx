import Link from "next/link";

export function Forbidden({ message }: { message: string }) {
  return (
    <div role="alert" className="mx-auto max-w-md rounded-xl border border-amber-400 bg-amber-50 p-6 text-center" data-testid="forbidden">
      <h1 className="text-xl font-semibold">Not for your role</h1>
      <p className="mt-2">{message}</p>
      <Link href="/jobs" className="mt-4 inline-flex min-h-12 items-center rounded-lg bg-ink px-5 font-semibold text-white">
        Back to the jobs board
      </Link>
    </div>
  );
}
