import { z } from "zod";

/** How long a new token may live; a pipeline's secret should be rotated at least once a year. */
export const TOKEN_LIFETIME_DAYS = [7, 30, 90, 365] as const;

/** The tokens page's form: a name that says where the token is used, and its lifetime. */
export const createApiTokenSchema = z.object({
  name: z
    .string()
    .trim()
    .min(1, "Name the token after the pipeline that will use it.")
    .max(80, "Keep the name under 80 characters."),
  lifetimeDays: z.coerce
    .number()
    .refine((days) => (TOKEN_LIFETIME_DAYS as readonly number[]).includes(days), {
      message: `Choose a lifetime of ${TOKEN_LIFETIME_DAYS.join(", ")} days.`,
    }),
});

export type CreateApiTokenInput = z.input<typeof createApiTokenSchema>;
