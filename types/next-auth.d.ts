import type { DefaultSession } from "next-auth";
import type { UserRole } from "@/db/schema";

declare module "next-auth" {
  interface Session {
    user: { id: string; role: UserRole; sv?: number } & DefaultSession["user"];
  }
  interface User {
    id: string;
    role: UserRole;
    sessionVersion?: number;
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    uid?: string;
    role?: UserRole;
    /** The account's session version when this token was made (users.session_version). */
    sv?: number;
  }
}
