/**
 * Array paths in JSON exports: `comments[].body` takes the body of every
 * element of `comments`. The export is an invented help-desk scenario.
 */
import { describe, expect, it } from 'vitest';
import { ingest } from '../src/ingest/index.js';
import { put, tmp, usage } from './helpers/files.js';

const TICKETS = [
  {
    ticket: {
      id: 'H-1',
      subject: 'Printer jams',
      comments: [
        { author: 'ana', body: 'Paper jams on tray 2.' },
        { author: 'desk', body: 'Try the rear door.' },
        { author: 'ana', body: '' },
        { author: 'ana' },
      ],
      tags: ['printer', 'floor-3'],
    },
  },
  { ticket: { id: 'H-2', subject: 'VPN drops', comments: [], tags: [] } },
  { ticket: { id: 'H-3', subject: 'Badge', comments: [{ body: { lang: 'en', text: 'lost' } }], tags: ['access'] } },
];

function write(): string {
  const dir = tmp();
  put(dir, 'desk.json', JSON.stringify(TICKETS));
  put(dir, 'desk.jsonl', TICKETS.map((t) => JSON.stringify(t)).join('\n'));
  return dir;
}

describe('JSON array paths', () => {
  it('comments[].body joins every comment body with blank lines; tags[] every tag', async () => {
    const dir = write();
    for (const file of ['desk.json', 'desk.jsonl']) {
      const r = await ingest([file], { text: ['ticket.subject', 'ticket.comments[].body', 'ticket.tags[]'], id: 'ticket.id' }, { cwd: dir });
      expect(r.docs.map((d) => [d.id, d.text])).toEqual([
        ['H-1', 'Printer jams\n\nPaper jams on tray 2.\n\nTry the rear door.\n\nprinter\n\nfloor-3'],
        ['H-2', 'VPN drops'],
        ['H-3', 'Badge\n\n{"lang":"en","text":"lost"}\n\naccess'],
      ]);
    }
  });

  it('reaches through arrays into nested objects, matches names case-insensitively, and titles take the first value', async () => {
    const dir = write();
    const r = await ingest(['desk.json'], { text: ['Ticket.Comments[].Body.Text'], title: 'ticket.comments[].author' }, { cwd: dir });
    expect(r.docs.map((d) => [d.text, d.title])).toEqual([
      ['', 'ana'],
      ['', '2'], // no comment: no title, no text, so the row number
      ['lost', 'lost'], // no author in any comment: the first line of the text
    ]);
  });

  it('says how to write a numeric path, refuses [] for --id, and lists the array paths', async () => {
    const dir = write();
    const numeric = await usage(ingest(['desk.json'], { text: ['ticket.comments.0.body'] }, { cwd: dir }));
    expect(numeric.message).toBe(
      'desk.json has no column "ticket.comments.0.body" for --text; to take every element of an array write [] after its name: "ticket.comments[].body"',
    );
    expect(numeric.option).toBe('text');
    const id = await usage(ingest(['desk.json'], { text: ['ticket.subject'], id: 'ticket.tags[]' }, { cwd: dir }));
    expect(id.message).toBe('--id takes one value per row; "ticket.tags[]" names every element of an array');
    expect(id.option).toBe('id');
    const missing = await usage(ingest(['desk.json'], { text: ['ticket.comments[].bdy'] }, { cwd: dir }));
    expect(missing.message).toBe(
      'desk.json has no column "ticket.comments[].bdy" for --text; its columns are: ticket.id, ticket.subject, ticket.comments, ticket.comments[].author, ticket.comments[].body, ticket.tags, ticket.tags[], ticket.comments[].body.lang, ticket.comments[].body.text',
    );
  });
});
