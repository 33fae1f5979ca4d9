/**
 * `assigned.csv` of `sheaf assign`: one row per new document, in input order.
 *
 * @module
 */
import type { Model } from '../model/index.js';
import type { ModelApplication } from '../model/apply.js';
import { csvText, fixed } from './csv.js';

/** `assigned.csv`: `id, group, label, fit, status`, then the input's own columns; status is matched or new. */
export function assignedCsv(model: Model, a: ModelApplication): string {
  const columns: string[] = [];
  const seen = new Set<string>(['id', 'group', 'label', 'fit', 'status']);
  for (const d of a.docs) for (const k of d.fields.keys()) if (!seen.has(k)) (seen.add(k), columns.push(k));
  function* rows(): Generator<string[]> {
    for (let i = 0; i < a.docs.length; i++) {
      const d = a.docs[i];
      const g = a.assignments[i];
      yield [
        d.id,
        g >= 0 ? String(g) : '',
        g >= 0 ? model.labels[g].label : '',
        g >= 0 ? fixed(a.fit[i]) : '',
        a.unmatched[i] ? 'new' : 'matched',
        ...columns.map((c) => d.fields.get(c) ?? ''),
      ];
    }
  }
  // The formula guard on sheaf's five columns only: the input's own columns are written as they were (see csv.ts).
  return csvText(['id', 'group', 'label', 'fit', 'status', ...columns], rows(), { guarded: 5 });
}
