import type { z } from "zod";

/**
 * Field errors keyed by the field's dotted path (e.g. `options.labelColumn`), first message only:
 * one clear sentence per field, addressable by nested form fields.
 */
export function firstFieldErrors(error: z.ZodError): Record<string, string> {
  const result: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length > 0 ? issue.path.map(String).join(".") : "form";
    result[key] ??= issue.message;
  }
  return result;
}
