/**
 * Cleaning as a stage of the pipeline and of the model: the library call on
 * the demo gives the groups `sheaf group` gives, the model records the
 * cleaning and `assign` applies it, version-1 models still load, and titles
 * taken from a first line follow the cleaned text.
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { ingest } from '../src/ingest/index.js';
import { groupDocuments } from '../src/pipeline.js';
import { modelFromJson } from '../src/model/index.js';
import { applyModel } from '../src/model/apply.js';
import { AUTO_CLUTTER_SHARE, cleanStage, resolveCleanStage, titleLine } from '../src/clean/stage.js';
import { modelJsonOf } from '../src/model/source.js';
import { DEMO_ARGS } from './golden-demo.test.js';

const root = path.resolve(__dirname, '..');
const golden = path.join(root, 'test', 'fixtures', 'golden');

describe('the library call and the CLI agree on the demo', () => {
  it('groupDocuments on the ingest result gives the groups of sheaf group (documents.csv of the golden run)', async () => {
    const read = await ingest(['corpus-demo/tickets.csv'], { text: ['subject', 'body'], id: 'ticket_id', title: 'subject' }, { cwd: root });
    const result = groupDocuments(read, { groups: 8 });
    const rows = parse(readFileSync(path.join(golden, 'documents.csv')), { columns: true, bom: true }) as Record<string, string>[];
    const byId = new Map(result.docs.map((d, r) => [d.id, result.partition.assignments[r]]));
    expect(rows).toHaveLength(result.docs.length);
    for (const row of rows) expect(String(byId.get(row.id!))).toBe(row.group);
    expect(result.clean.changed).toBe(316);
  });
});

describe('the model records its cleaning and assign applies it', () => {
  let dir: string;
  beforeAll(async () => {
    dir = tempDir();
    const lines = ['id,body'];
    for (let i = 0; i < 12; i++) lines.push(`${i},"Hi team,\nmy refund for order ${i} never came back to the card\nThanks\nAnna"`);
    for (let i = 12; i < 24; i++) lines.push(`${i},"Hello,\nthe app crashes at login on my phone again\nBest regards\nBen"`);
    writeFileSync(path.join(dir, 't.csv'), lines.join('\n') + '\n');
    writeFileSync(path.join(dir, 'new.csv'), 'id,body\nn1,"Hi team,\nrefund never came back\nThanks\nAnna"\n');
    const run = await sheaf(['group', 't.csv', '--text', 'body', '--groups', '2', '--out', 'cleaned', '--quiet', '--no-duplicates', '--no-report'], { cwd: dir });
    expect(run.code).toBe(0);
    const raw = await sheaf(['group', 't.csv', '--text', 'body', '--groups', '2', '--clean', 'none', '--out', 'raw', '--quiet', '--no-duplicates', '--no-report'], { cwd: dir });
    expect(raw.code).toBe(0);
  });

  it('model.json (version 3) holds the cleaning settings', () => {
    const m = JSON.parse(readFileSync(path.join(dir, 'raw', 'model.json'), 'utf8'));
    expect(m.version).toBe(3);
    expect(m.cleaning.mode).toBe('none');
    // Under auto the pile (every row greets and signs) was judged worth cleaning: the model records that decision.
    expect(JSON.parse(readFileSync(path.join(dir, 'cleaned', 'model.json'), 'utf8')).cleaning).toMatchObject({ mode: 'tickets', detect: false });
  });

  it('sheaf assign cleans new documents as the model was fitted: not at all for --clean none', async () => {
    const a = await sheaf(['assign', 'new.csv', '--text', 'body', '--model', 'raw/model.json', '--out', 'a1', '--quiet'], { cwd: dir });
    expect(a.code).toBe(0);
    expect(JSON.parse(readFileSync(path.join(dir, 'a1', 'run.json'), 'utf8')).cleaning.mode).toBe('none');
    const b = await sheaf(['assign', 'new.csv', '--text', 'body', '--model', 'cleaned/model.json', '--out', 'a2', '--quiet'], { cwd: dir });
    expect(b.code).toBe(0);
    const clean = JSON.parse(readFileSync(path.join(dir, 'a2', 'run.json'), 'utf8')).cleaning;
    expect(clean.mode).toBe('tickets');
    expect(clean.changed).toBe(1);
  });

  it('a version-1 model (no cleaning field) still loads, with the cleaning the old assign applied (auto)', () => {
    const m = JSON.parse(readFileSync(path.join(dir, 'raw', 'model.json'), 'utf8'));
    delete m.cleaning;
    delete m.reduce; // a version-1 model never held a projection
    delete m.novelty; // nor the calibration record of version 3
    m.version = 1;
    const model = modelFromJson(JSON.stringify(m));
    expect(model.cleaning.mode).toBe('auto');
    expect(model.cleaning.rules.quotes).toBe(true);
    const v2 = { ...JSON.parse(readFileSync(path.join(dir, 'raw', 'model.json'), 'utf8')) };
    delete v2.cleaning;
    expect(() => modelFromJson(JSON.stringify(v2), 'm.json')).toThrow('m.json is damaged: cleaning: missing');
  });

  it('applyModel cleans with the model settings', () => {
    const model = modelFromJson(readFileSync(path.join(dir, 'cleaned', 'model.json'), 'utf8'));
    const doc = { id: 'x', source: 's#1', title: 'Hi team,', text: 'Hi team,\nrefund never came back\nThanks\nAnna', fields: new Map(), titleFromText: true };
    const a = applyModel(model, { docs: [doc], exportRows: [1] });
    expect(a.docs[0]!.text).toBe('refund never came back');
    // The fitted pile was judged ticket-like, so a document file is cleaned the same way.
    expect(applyModel(model, [doc]).docs[0]!.text).toBe('refund never came back');
  });
});

describe('titles taken from the first line follow cleaning', () => {
  it('a title from the first line is retaken from the first line that survives; a title column is kept', () => {
    const text = 'Hello,\nmy refund never came back\nThanks\nAnna';
    const fromText = { id: 'a', source: 'x#1', title: 'Hello,', text, fields: new Map(), titleFromText: true };
    const fromColumn = { id: 'b', source: 'x#2', title: 'Hello,', text, fields: new Map() };
    const out = cleanStage({ docs: [fromText, fromColumn], exportRows: [1, 1] }, resolveCleanStage({}));
    expect(out.docs[0]!.title).toBe('my refund never came back');
    expect(out.docs[1]!.title).toBe('Hello,');
  });

  it('ingest marks rows whose title is their first line', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'r.csv'), 'id,subject,body\n1,Refund,"Hi,\nwhere is it"\n2,,"Hello,\nlogin fails"\n');
    const read = await ingest(['r.csv'], { text: ['body'], id: 'id', title: 'subject' }, { cwd: dir });
    expect(read.docs.map((d) => [d.title, d.titleFromText ?? false])).toEqual([
      ['Refund', false],
      ['Hello,', true],
    ]);
  });
});

describe('titles recomputed after cleaning show the words a person wrote, not placeholder words', () => {
  it('maps a cleaned first line holding placeholders back to the original line', () => {
    expect(titleLine('invoice for bk29-xnumx', 'Hi there,\ninvoice for bk29-91344\nthanks')).toBe('invoice for bk29-91344');
    expect(titleLine('see xurlx (broken)', 'see https://example.org/a?b=1 (broken)\nmore')).toBe('see https://example.org/a?b=1 (broken)');
  });
  it('keeps a line without placeholders, and the cleaned line when no original line matches', () => {
    expect(titleLine('Pump-out needed', 'Hello,\nPump-out needed')).toBe('Pump-out needed');
    expect(titleLine('call xnumx now', 'nothing alike here')).toBe('call xnumx now');
  });
  it('the cleaning stage uses it for rows whose title was their first line', () => {
    const docs = [{ id: '1', source: 't.csv#1', title: 'Good morning,', text: 'Good morning,\ninvoice for bk29-91344 is wrong\nthanks', fields: new Map<string, string>(), titleFromText: true }];
    const out = cleanStage({ docs, exportRows: Uint8Array.of(1) }, resolveCleanStage({}));
    expect(out.docs[0]!.text).toContain('xnumx');
    expect(out.docs[0]!.title).toBe('invoice for bk29-91344 is wrong');
  });
});

describe('auto cleaning decides per pile whether its rows hold ticket clutter', () => {
  const rows = (texts: string[]) => ({
    docs: texts.map((text, i) => ({ id: String(i + 1), source: `t.csv#${i + 1}`, title: text.split('\n')[0]!, text, fields: new Map<string, string>() })),
    exportRows: new Uint8Array(texts.length).fill(1),
  });

  it('cleans the demo tickets (a third of the rows hold replies, signatures or greetings)', async () => {
    const read = await ingest([path.join(root, 'corpus-demo', 'tickets.csv')], { text: ['subject', 'body'], id: 'ticket_id' }, { cwd: root });
    const out = cleanStage(read, resolveCleanStage({}));
    expect(out.report.detected).toEqual({ share: out.report.withClutter / 457, threshold: AUTO_CLUTTER_SHARE, applied: true });
    expect(out.report.withClutter).toBe(148);
    expect(out.report.changed).toBeGreaterThan(0);
  });

  it('keeps rows of other text as written, and says what it found', () => {
    // Descriptions with a line that looks like a quoted reply and one like a signature: 2 of 12 rows (17%).
    const texts = Array.from({ length: 10 }, (_, i) => `Tool number ${i} sorts files by size.\nIt reads folders recursively.`);
    texts.push('Shell helper.\n> prompt examples are shown like this\nand more text here');
    texts.push('Library for parsing.\n--\nMaintainer team');
    const input = rows(texts);
    const out = cleanStage(input, resolveCleanStage({}));
    expect(out.report.detected?.applied).toBe(false);
    expect(out.report.detected?.share).toBeCloseTo(2 / 12, 10);
    expect(out.docs.map((d) => d.text)).toEqual(texts);
    expect(out.report.changed).toBe(0);
    // detect: false (or --clean tickets) cleans them whatever they hold.
    expect(cleanStage(input, resolveCleanStage({ detect: false })).docs[10]!.text).not.toContain('> prompt');
  });

  it('the model keeps the decision: assign cleans new rows as the pile was cleaned, without deciding again', () => {
    const kept = groupDocuments(rows(Array.from({ length: 8 }, (_, i) => `pump ${i % 2 ? 'water' : 'tank'} leak report\nsee attached`)), { groups: 2 });
    expect(kept.clean.detected?.applied).toBe(false);
    const model = modelFromJson(modelJsonOf(kept, 'test', null));
    expect(model.cleaning).toEqual({ ...model.cleaning, mode: 'none', detect: false });
    const one = rows(['Hi team,\npump water leak\n> earlier message\nThanks']);
    expect(applyModel(model, one).docs[0]!.text).toBe(one.docs[0]!.text);
  });

  it('files are judged as rows are: mail files full of replies are cleaned, notes are kept as written', () => {
    const file = (i: number, text: string) => ({ id: String(i), source: `n${i}.txt`, title: 't', text, fields: new Map<string, string>() });
    const notes = Array.from({ length: 8 }, (_, i) => file(i, `pump ${i % 2 ? 'water' : 'tank'} leak note`));
    const kept = groupDocuments(notes, { groups: 2 });
    expect(kept.clean.detected).toEqual({ share: 0, threshold: AUTO_CLUTTER_SHARE, applied: false });
    expect(modelFromJson(modelJsonOf(kept, 'test', null)).cleaning).toMatchObject({ mode: 'none', detect: false });
    const mails = Array.from({ length: 8 }, (_, i) => file(i, `Hi team,\npump ${i % 2 ? 'water' : 'tank'} leak again\nThanks\nAnna`));
    const cleaned = groupDocuments(mails, { groups: 2 });
    expect(cleaned.clean.detected?.applied).toBe(true);
    expect(cleaned.docs.map((d) => d.text)).toEqual(mails.map((m) => m.text.split('\n')[1]));
  });

  it('refuses a detect that is not true or false', () => {
    expect(() => resolveCleanStage({ detect: 'yes' as unknown as boolean })).toThrow('detect must be true or false; got "yes"');
  });
});
