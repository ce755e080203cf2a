/** The one error shape every API route answers with. */
import { z } from 'zod';

export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    /** Per-field messages for validation errors, keyed by the field's path ("email", "skaterId"). */
    fields: z.record(z.string(), z.string()).optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>;

/** Turns zod issues into one readable sentence and a per-field map (first message per field). */
export function describeIssues(issues: readonly { path: PropertyKey[]; message: string }[]) {
  // A Map, not a plain object: a field named "constructor" or "__proto__" is a field like any other.
  const byField = new Map<string, string>();
  for (const issue of issues) {
    const key = issue.path.map(String).join('.') || '_';
    if (!byField.has(key)) byField.set(key, issue.message);
  }
  const message = [...byField]
    .map(([key, text]) => (key === '_' ? text : `${key}: ${text}`))
    .join('; ');
  return { message, fields: Object.fromEntries(byField) as Record<string, string> };
}
