import { z } from "zod";
import { emailSchema, passwordSchema, roleSchema } from "./auth";
import { passwordProblem } from "./password-rules";
import { storableText } from "./text";

export const userBaseSchema = z.object({
  id: z.string().uuid("Unknown person."),
  name: storableText(
    z
      .string({ error: "Enter a name." })
      .trim()
      .min(2, "Enter the person's name.")
      .max(100, "Keep the name under 100 characters."),
  ),
  email: emailSchema,
  role: roleSchema,
  password: passwordSchema,
});

export const createUserSchema = userBaseSchema.omit({ id: true }).superRefine((d, ctx) => {
  // The password's own rules are checked on the field; here only what needs the account.
  if (typeof d.password !== "string" || passwordProblem(d.password)) return;
  const problem = passwordProblem(d.password, { email: d.email, name: d.name });
  if (problem) ctx.addIssue({ code: "custom", path: ["password"], message: problem });
});
export const resetPasswordSchema = userBaseSchema.pick({ id: true, password: true });
export const changeRoleSchema = userBaseSchema.pick({ id: true, role: true });
export const personSchema = userBaseSchema.pick({ id: true });
export const setActiveSchema = personSchema.extend({
  active: z.enum(["true", "false"], { error: "Choose whether the account may sign in." }).transform((v) => v === "true"),
});

export type CreateUserInput = z.infer<typeof createUserSchema>;
