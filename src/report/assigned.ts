/**
 * `assigned.csv` of `sheaf assign`: one row per new document, in input order.
 *
 * @module
 */
import type { Model } from '../model/index.js';
import type { ModelApplication } from '../model/apply.js';
import { csvText } from './csv.js';
import { ASSIGNED_ROW_COLUMNS, assignedRowCells } from './assigned-rows.js';

/**
 * `assigned.csv`: `id, group, label, fit, status, second_group, second_label, second_fit`, then the input's own
 * columns; status is matched or new; group/label/fit are the nearest group, second_* the next nearest (empty when
 * the row shares no term with the model).
 */
export function assignedCsv(model: Model, a: ModelApplication): string {
  const columns: string[] = [];
  const own = ASSIGNED_ROW_COLUMNS;
  const seen = new Set<string>(own);
  for (const d of a.docs) for (const k of d.fields.keys()) if (!seen.has(k)) (seen.add(k), columns.push(k));
  function* rows(): Generator<string[]> {
    for (let i = 0; i < a.docs.length; i++) {
      const d = a.docs[i];
      yield [
        ...assignedRowCells(model, a, i),
        ...columns.map((c) => d.fields.get(c) ?? ''),
      ];
    }
  }
  // The formula guard on sheaf's own columns only: the input's own columns are written as they were (see csv.ts).
  return csvText([...own, ...columns], rows(), { guarded: own.length });
}
