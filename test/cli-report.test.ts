/**
 * The CLI's new report inputs: `group --date` (trends.csv, run.json, the
 * report's "Over time" view, file modification times for folders), links
 * from the report to input files, the page size, `sheaf duplicates`' own
 * report, and hostile text in columns, dates and names.
 */
import { describe, expect, it } from 'vitest';
import { mkdirSync, readFileSync, utimesSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { HOSTILE } from './helpers/browser.js';
import { REPORT_DATA_ELEMENT_ID } from '../src/report/html.js';

const root = path.resolve(__dirname, '..');

/** The report's embedded data block, parsed. */
function payloadOf(html: string): any {
  const open = `<script type="application/json" id="${REPORT_DATA_ELEMENT_ID}">`;
  const start = html.indexOf(open) + open.length;
  return JSON.parse(html.slice(start, html.indexOf('</script>', start)));
}

/** Monday 00:00 UTC of the week holding `ms`, as YYYY-MM-DD (plain Date arithmetic, not src/trends). */
function mondayKey(ms: number): string {
  const day = Math.floor(ms / 86_400_000);
  return new Date((day - ((day + 3) % 7)) * 86_400_000).toISOString().slice(0, 10);
}

describe('group --date', () => {
  it('writes trends.csv with the counts per group per ISO week that the export and documents.csv give', async () => {
    const dir = tempDir();
    const run = await sheaf(
      ['group', path.join(root, 'corpus-demo', 'tickets.csv'), '--text', 'subject,body', '--id', 'ticket_id', '--groups', '8', '--date', 'created', '--out', 'o', '--no-duplicates'],
      { cwd: dir },
    );
    expect(run.code).toBe(0);
    const docs = parse(readFileSync(path.join(dir, 'o', 'documents.csv')), { columns: true, bom: true }) as Record<string, string>[];
    // Independent count: group from documents.csv, week from Date.parse of created.
    const want = new Map<string, number>();
    for (const d of docs) {
      if (d.group === '') continue;
      const key = `${d.group}|${mondayKey(Date.parse(d.created))}`;
      want.set(key, (want.get(key) ?? 0) + 1);
    }
    const rows = parse(readFileSync(path.join(dir, 'o', 'trends.csv')), { columns: true, bom: true }) as { group: string; period: string; count: string }[];
    const record = JSON.parse(readFileSync(path.join(dir, 'o', 'run.json'), 'utf8'));
    expect(record.trends.granularity).toBe('week');
    expect(record.trends.unparsed).toBe(0);
    const periods: string[] = record.trends.periods;
    // Period keys are ISO weeks; map each to its Monday through the first one (2029-W11 starts on Monday 2029-03-12).
    expect(periods[0]).toBe('2029-W11');
    const monday0 = Date.UTC(2029, 2, 12);
    const got = new Map<string, number>();
    for (const r of rows) {
      if (r.count === '0') continue;
      const monday = new Date(monday0 + periods.indexOf(r.period) * 7 * 86_400_000).toISOString().slice(0, 10);
      got.set(`${r.group}|${monday}`, Number(r.count));
    }
    expect(got).toEqual(want);
    expect(rows).toHaveLength(8 * periods.length);
    // The page size is in run.json.
    expect(record.reportBytes).toBe(readFileSync(path.join(dir, 'o', 'report.html')).length);
    const payload = payloadOf(readFileSync(path.join(dir, 'o', 'report.html'), 'utf8'));
    expect(payload.trends.periods).toEqual(periods);
  }, 120_000);

  it('refuses a column that is not in the input, naming the columns', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 't.csv'), 'id,when,text\n1,2029-01-01,alpha beta\n2,2029-01-02,gamma delta\n3,2029-01-03,alpha gamma\n');
    const run = await sheaf(['group', 't.csv', '--text', 'text', '--id', 'id', '--groups', '2', '--date', 'created', '--out', 'o'], { cwd: dir });
    expect(run.code).toBe(2);
    expect(run.stderr).toBe('sheaf: --date column "created" is not in the input; its columns are: when, text\n');
  });

  it('--date mtime counts files by modification time; the report links each document to its file', async () => {
    const dir = tempDir();
    const notes = path.join(dir, 'notes');
    mkdirSync(path.join(notes, 'sub dir'), { recursive: true });
    const files: [string, string, string][] = [
      ['a.txt', 'pump tank water leak pump tank', '2029-05-01T10:00:00Z'],
      ['b.txt', 'pump tank water leak again pump', '2029-05-02T10:00:00Z'],
      ['c.txt', 'invoice card payment charged invoice', '2029-05-01T12:00:00Z'],
      ['sub dir/d #1.txt', 'invoice card payment refund invoice', '2029-05-03T09:00:00Z'],
    ];
    for (const [name, text, when] of files) {
      writeFileSync(path.join(notes, name), text);
      const t = new Date(when);
      utimesSync(path.join(notes, name), t, t);
    }
    const run = await sheaf(['group', 'notes', '--groups', '2', '--date', 'mtime', '--out', 'o', '--no-duplicates'], { cwd: dir });
    expect(run.code).toBe(0);
    const record = JSON.parse(readFileSync(path.join(dir, 'o', 'run.json'), 'utf8'));
    expect(record.trends.granularity).toBe('day');
    expect(record.trends.periods).toEqual(['2029-05-01', '2029-05-02', '2029-05-03']);
    expect(record.trends.zone).toBe('UTC (file modification times)');
    const totals = record.trends.counts.map((c: { counts: number[] }) => c.counts.reduce((a: number, b: number) => a + b, 0));
    expect(totals.reduce((a: number, b: number) => a + b, 0)).toBe(4);
    const payload = payloadOf(readFileSync(path.join(dir, 'o', 'report.html'), 'utf8'));
    const links = new Map<string, string>(payload.documents.id.map((id: string, i: number) => [id, payload.documents.link[i]]));
    // Relative to the output folder, each segment percent-encoded.
    expect(links.get('a.txt')).toBe('../notes/a.txt');
    expect(links.get('sub dir/d #1.txt')).toBe('../notes/sub%20dir/d%20%231.txt');
  }, 60_000);
});

describe('hostile text in columns, dates and names', () => {
  it('stays inside the JSON blocks of report.html, and trends.csv/run.json carry it as data', async () => {
    const dir = tempDir();
    const q = (s: string) => `"${s.replace(/"/g, '""')}"`;
    const lines = [`id,${q(HOSTILE.img)},when,text`];
    const words = ['pump tank water leak', 'invoice card payment charged', 'berth mooring passage'];
    for (let i = 0; i < 12; i++) {
      const when = i === 3 ? HOSTILE.script : `2029-06-${String(1 + i).padStart(2, '0')}`;
      const id = i === 3 ? HOSTILE.close : `R${i}`;
      lines.push([q(id), q(i === 0 ? HOSTILE.comment : 'x'), q(when), q(`${words[i % 3]} ${i === 5 ? HOSTILE.svg : ''}`)].join(','));
    }
    writeFileSync(path.join(dir, 'h.csv'), lines.join('\n') + '\n');
    const run = await sheaf(['group', 'h.csv', '--text', 'text', '--id', 'id', '--groups', '3', '--date', 'when', '--out', 'o'], { cwd: dir });
    expect(run.code).toBe(0);
    const html = readFileSync(path.join(dir, 'o', 'report.html'), 'utf8');
    for (const h of [HOSTILE.img, HOSTILE.script, HOSTILE.close, HOSTILE.comment, HOSTILE.svg]) expect(html).not.toContain(h);
    // Executable scripts: only the page's own (the rest are JSON blocks).
    expect((html.match(/<script>/g) ?? []).length).toBe(1);
    expect((html.match(/<script type="application\/json"/g) ?? []).length).toBe(2);
    const record = JSON.parse(readFileSync(path.join(dir, 'o', 'run.json'), 'utf8'));
    expect(record.trends.unparsed).toBe(1);
    expect(record.trends.unparsedIds).toEqual([HOSTILE.close]);
    const payload = payloadOf(html);
    expect(payload.columns.names).toEqual([HOSTILE.img, 'when', 'text']);
    expect(payload.columns.values[0][0]).toBe(HOSTILE.comment);
    // The unparsed document is listed, escaped, in the "Over time" view.
    expect(html).toContain('&lt;/script&gt;&lt;script&gt;window.__pwned = &quot;close&quot;&lt;/script&gt;');
    const trends = readFileSync(path.join(dir, 'o', 'trends.csv'), 'utf8').split('\r\n');
    expect(trends[0]).toBe('\uFEFFgroup,period,count');
    for (const line of trends.slice(1, -1)) expect(line).toMatch(/^\d+,2029-06-\d\d,\d+$/);
  }, 60_000);
});

describe('sheaf duplicates writes a report', () => {
  it('report.html with the sets and the documents in them; --no-report leaves it out', async () => {
    const dir = tempDir();
    const run = await sheaf(['duplicates', path.join(root, 'corpus-demo', 'tickets.csv'), '--text', 'subject,body', '--id', 'ticket_id', '--title', 'subject', '--out', 'o'], { cwd: dir });
    expect(run.code).toBe(0);
    const sets = JSON.parse(readFileSync(path.join(dir, 'o', 'duplicates.json'), 'utf8'));
    const payload = payloadOf(readFileSync(path.join(dir, 'o', 'report.html'), 'utf8'));
    const members = (sets.sets as { members: unknown[] }[]).reduce((a, s) => a + s.members.length, 0);
    expect(payload.duplicates.sets).toHaveLength(sets.sets.length);
    expect(payload.documents.id).toHaveLength(members);
    expect(run.stdout).toContain(path.join('o', 'report.html'));
    const none = await sheaf(['duplicates', path.join(root, 'corpus-demo', 'tickets.csv'), '--text', 'subject,body', '--id', 'ticket_id', '--out', 'p', '--no-report'], { cwd: dir });
    expect(none.code).toBe(0);
    expect(none.stdout).not.toContain('report.html');
  }, 60_000);
});
