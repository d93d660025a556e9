import { z } from "zod";

export const signInSchema = z.object({
  email: z.string().trim().email("Enter the email you were invited with."),
  password: z.string().min(1, "Enter your password."),
});
