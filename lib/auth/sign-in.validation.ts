import { z } from "zod";

export const signInSchema = z.object({
  email: z.email({ error: "Enter your work e-mail address." }).max(254),
  password: z.string().min(1, { error: "Enter your password." }).max(1024),
});
export type SignInInput = z.infer<typeof signInSchema>;
