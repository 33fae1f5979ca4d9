/**
 * One zod validation issue as the tail of a one-line message:
 * `where: what`, with unknown keys named. Shared by the readers of sheaf's
 * own JSON files (model.json, term-counts files).
 *
 * @module
 */
import type { z } from 'zod';

/** `path.to.field: what is wrong` (or `(top level): …`) for the first issue of a failed parse. */
export function zodIssueLine(error: z.ZodError): string {
  const issue = error.issues[0]!;
  const where = issue.path.length ? issue.path.join('.') : '(top level)';
  const what = issue.code === 'unrecognized_keys' ? `unexpected field(s) ${issue.keys.map((k) => JSON.stringify(k)).join(', ')}` : issue.message;
  return `${where}: ${what}`;
}
