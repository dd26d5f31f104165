import { z } from "zod";
import { passwordProblem } from "./password-rules";

export const ROLES = ["technician", "supervisor", "admin"] as const;
export const roleSchema = z.enum(ROLES);

export const emailSchema = z
  .string({ error: "Enter your e-mail address." })
  .trim()
  .toLowerCase()
  .min(1, "Enter your e-mail address.")
  .max(200, "That e-mail address is too long.")
  .email("That does not look like an e-mail address.");

/** A new password on its own; rules that need the account (its e-mail, its name) are added where it is known. */
export const passwordSchema = z.string({ error: "Enter a password." }).superRefine((p, ctx) => {
  const problem = passwordProblem(p);
  if (problem) ctx.addIssue({ code: "custom", message: problem });
});

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password.").max(200),
});

export type SignInInput = z.infer<typeof signInSchema>;
