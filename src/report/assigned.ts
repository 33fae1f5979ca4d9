/**
 * `assigned.csv` of `sheaf assign`: one row per new document, in input order.
 *
 * @module
 */
import type { Model } from '../model/index.js';
import type { ModelApplication } from '../model/apply.js';
import { csvText, fixed } from './csv.js';

/**
 * `assigned.csv`: `id, group, label, fit, status, second_group, second_label, second_fit`, then the input's own
 * columns; status is matched or new; group/label/fit are the nearest group, second_* the next nearest (empty when
 * the row shares no term with the model).
 */
export function assignedCsv(model: Model, a: ModelApplication): string {
  const columns: string[] = [];
  const own = ['id', 'group', 'label', 'fit', 'status', 'second_group', 'second_label', 'second_fit'];
  const seen = new Set<string>(own);
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
        a.second[i]! >= 0 ? String(a.second[i]) : '',
        a.second[i]! >= 0 ? model.labels[a.second[i]!]!.label : '',
        a.second[i]! >= 0 ? fixed(a.secondFit[i]!) : '',
        ...columns.map((c) => d.fields.get(c) ?? ''),
      ];
    }
  }
  return csvText([...own, ...columns], rows());
}
