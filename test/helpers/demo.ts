/** The demo tickets (corpus-demo/tickets.csv) as documents: subject and body, `category` kept as a field. */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import type { Doc } from '../../src/types.js';

/** Every demo ticket, in file order. */
export function demoDocs(): Doc[] {
  const file = path.resolve(__dirname, '..', '..', 'corpus-demo', 'tickets.csv');
  const rows = parse(readFileSync(file), { columns: true }) as Record<string, string>[];
  return rows.map((r) => ({ id: r.ticket_id, source: 'tickets.csv', title: r.subject, text: `${r.subject}\n\n${r.body}`, fields: new Map([['category', r.category]]) }));
}
