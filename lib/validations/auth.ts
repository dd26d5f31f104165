import { z } from "zod";

export const ROLES = ["technician", "supervisor", "admin"] as const;
export const roleSchema = z.enum(ROLES);

export const emailSchema = z
  .string({ error: "Enter your e-mail address." })
  .trim()
  .toLowerCase()
  .min(1, "Enter your e-mail address.")
  .max(200, "That e-mail address is too long.")
  .email("That does not look like an e-mail address.");

export const passwordSchema = z
  .string({ error: "Enter a password." })
  .min(10, "Use at least 10 characters.")
  .max(200, "Use at most 200 characters.");

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password.").max(200),
});

export type SignInInput = z.infer<typeof signInSchema>;
