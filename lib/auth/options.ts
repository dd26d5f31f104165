// next-auth configuration: e-mail and password against the users table, JWT sessions that
// carry the user's id and role.
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { getDb } from "@/db/client";
import { serverEnv } from "@/lib/env";
import { signInSchema } from "@/lib/validations/auth";
import { checkCredentials } from "./credentials";
import { authSecret } from "./secret";
import { signInRefusal } from "./sign-in-errors";
import { AddressThrottle, requestAddress } from "./throttle";

const g = globalThis as unknown as { __grindfadeSignInThrottle?: AddressThrottle };
function throttle(): AddressThrottle {
  g.__grindfadeSignInThrottle ??= new AddressThrottle({
    maxFailures: serverEnv().GRINDFADE_SIGNIN_MAX_PER_ADDRESS,
    windowMs: 15 * 60_000,
  });
  return g.__grindfadeSignInThrottle;
}

export const authOptions: NextAuthOptions = {
  secret: authSecret(),
  session: { strategy: "jwt", maxAge: 12 * 60 * 60 },
  pages: { signIn: "/sign-in", error: "/sign-in" },
  providers: [
    CredentialsProvider({
      name: "Shop account",
      credentials: {
        email: { label: "E-mail", type: "email" },
        password: { label: "Password", type: "password" },
      },
      async authorize(raw, req) {
        const address = requestAddress(req?.headers, serverEnv().GRINDFADE_TRUSTED_PROXIES);
        const wait = throttle().waitMinutes(address);
        // Refusals are codes: the sign-in page turns them into sentences (lib/auth/sign-in-errors.ts).
        if (wait > 0) throw new Error(signInRefusal.throttled(wait));
        const parsed = signInSchema.safeParse(raw ?? {});
        if (!parsed.success) throw new Error(signInRefusal.badInput);
        const env = serverEnv();
        const result = await checkCredentials(await getDb(), parsed.data.email, parsed.data.password, {
          maxFailures: env.GRINDFADE_SIGNIN_MAX_FAILURES,
          lockMinutes: env.GRINDFADE_SIGNIN_LOCK_MINUTES,
        });
        if (result.ok) {
          return { id: result.user.id, name: result.user.name, email: result.user.email, role: result.user.role, sessionVersion: result.user.sessionVersion };
        }
        throttle().recordFailure(address);
        if (result.reason === "locked") throw new Error(signInRefusal.locked(result.retryInMinutes));
        throw new Error(signInRefusal.invalid);
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = user.id;
        token.role = user.role;
        token.sv = user.sessionVersion ?? 0;
      }
      return token;
    },
    async session({ session, token }) {
      if (token.uid && token.role) {
        session.user = { ...session.user, id: token.uid, role: token.role, sv: token.sv ?? 0 };
      }
      return session;
    },
  },
};
