import { z } from "zod";
import { ROLES } from "@/lib/auth/roles";

export const MIN_PASSWORD_LENGTH = 10;

const email = z
  .string()
  .trim()
  .min(1, "Enter your e-mail address.")
  .pipe(z.email("Enter a valid e-mail address, like name@example.com."))
  .transform((value) => value.toLowerCase());

const newPassword = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
  .max(200, "Use at most 200 characters.");

export const signUpSchema = z.object({
  name: z
    .string()
    .trim()
    .min(1, "Enter your name.")
    .max(100, "Keep your name under 100 characters."),
  email,
  password: newPassword,
  workspaceName: z
    .string()
    .trim()
    .min(1, "Name your workspace.")
    .max(80, "Keep the workspace name under 80 characters."),
  invitationToken: z.string().optional(),
});
export type SignUpInput = z.input<typeof signUpSchema>;

export const passwordChangeSchema = z.object({
  // Empty when the account has no password yet (it signs in by e-mail link only).
  currentPassword: z.string(),
  newPassword,
});
export type PasswordChangeInput = z.input<typeof passwordChangeSchema>;

export const signInSchema = z.object({
  email,
  password: z.string().min(1, "Enter your password."),
});

export const emailLinkSchema = z.object({ email });

export const invitationSchema = z.object({
  email,
  role: z.enum(ROLES, { message: "Choose a role." }),
});

export const roleChangeSchema = z.object({
  userId: z.string().min(1),
  role: z.enum(ROLES, { message: "Choose a role." }),
});
