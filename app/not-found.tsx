import Link from "next/link";

export default function NotFound() {
  return (
    <main className="mx-auto flex min-h-dvh max-w-md flex-col items-center justify-center gap-4 p-6 text-center">
      <p className="figure text-5xl font-bold text-brass">404</p>
      <h1 className="text-2xl font-semibold">Nothing on this bench</h1>
      <p className="text-stone-600">The page you asked for does not exist or has moved.</p>
      <Link href="/jobs" className="rounded-lg bg-ink px-5 py-3 font-semibold text-white">
        Back to the jobs board
      </Link>
    </main>
  );
}
