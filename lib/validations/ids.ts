// Ids as the app sends them: UUIDs, accepted in any letter case and passed on in lower case, the
// case PostgreSQL answers them in, so that an id compared or used as a map key in our own code
// matches the database's.
import { z } from "zod";

export const uuidText = (message?: string) =>
  z
    .string()
    .uuid(message)
    .transform((id) => id.toLowerCase());
