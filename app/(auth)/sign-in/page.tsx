import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { currentActor } from "@/lib/auth/guard";
import { SignInForm } from "@/components/auth/sign-in-form";
import { signInErrorMessage } from "@/lib/auth/sign-in-errors";

export const metadata: Metadata = { title: "Sign in" };

// Where to go after signing in: a path on this site only. The value is parsed as browsers parse
// a link (WHATWG URL): "//host", a backslash as in "/\host", or a tab or newline inside "/<tab>/host"
// all lead browsers to another site, so they are refused; a good path is passed on as parsed.
const HERE = "http://grindfade.invalid";

function safeCallback(value: string | string[] | undefined): string {
  const v = Array.isArray(value) ? value[0] : value;
  // By default the home page, which sends each role to its own start (a technician to their work).
  if (!v || !v.startsWith("/")) return "/";
  const url = URL.canParse(v, HERE) ? new URL(v, HERE) : null;
  return url && url.origin === HERE ? `${url.pathname}${url.search}${url.hash}` : "/";
}

export default async function SignInPage({ searchParams }: PageProps<"/sign-in">) {
  const params = await searchParams;
  const callbackUrl = safeCallback(params.callbackUrl);
  if (await currentActor()) redirect(callbackUrl);
  // Our own sentence for the code in the address, never the address's text.
  const initialError = signInErrorMessage(Array.isArray(params.error) ? params.error[0] : params.error);
  return (
    <main className="flex min-h-dvh items-center justify-center bg-ink p-4">
      <div className="w-full max-w-sm rounded-2xl bg-paper p-6 shadow-xl sm:p-8">
        <div className="mb-6 flex items-center gap-3">
          <span aria-hidden className="inline-block h-9 w-9 rounded-full border-[6px] border-amber-500" />
          <div>
            <h1 className="text-2xl font-bold tracking-tight">Grindfade</h1>
            <p className="text-sm text-stone-600">Sign in with your shop account</p>
          </div>
        </div>
        <SignInForm callbackUrl={callbackUrl} initialError={initialError} />
      </div>
    </main>
  );
}
