import { z } from "zod";
import { emailSchema, passwordSchema, roleSchema } from "./auth";
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

export const createUserSchema = userBaseSchema.omit({ id: true });
export const resetPasswordSchema = userBaseSchema.pick({ id: true, password: true });
export const changeRoleSchema = userBaseSchema.pick({ id: true, role: true });

export type CreateUserInput = z.infer<typeof createUserSchema>;
