/**
 * The report as a place to work, in Debian's Chromium: the document reader,
 * filters by the export's columns, the coarser/finer cut of the tree, counts
 * over time, scores against known labels, the near-copy report of
 * `sheaf duplicates`, narrow screens, and hostile text in every new place.
 * Screenshots of each view go to test-output/screens/ (git-ignored).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { renderReport } from '../src/report/html.js';
import { formatCount, formatFixed } from '../src/report/html-escape.js';
import type { ReportData } from '../src/report/report-data.js';
import { ingest } from '../src/ingest/index.js';
import { groupDocuments } from '../src/pipeline.js';
import { nearCopiesOfVectors, findDuplicates, resolveFindDuplicatesOptions } from '../src/near-copies.js';
import { reportFromRun } from '../src/report/report-from-run.js';
import { evaluateLabels } from '../src/report/outputs.js';
import { groupTrends } from '../src/trends/index.js';
import { duplicatesReportData } from '../src/report/report-duplicates.js';
import { HOSTILE, REPO_ROOT, launchBrowser, tinyReport, writeTempHtml } from './helpers/browser.js';

/* eslint-disable @typescript-eslint/no-explicit-any -- page callbacks run in the browser, where DOM types exist */

const SHOTS = path.join(REPO_ROOT, 'test-output', 'screens');

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
  mkdirSync(SHOTS, { recursive: true });
});
afterAll(async () => {
  await browser?.close();
});

interface Opened {
  page: Page;
  context: BrowserContext;
  errors: string[];
}

async function open(html: string, width = 1200): Promise<Opened> {
  const { url } = writeTempHtml(html);
  const context = await browser.newContext({ locale: 'en-US', viewport: { width, height: 900 } });
  const page = await context.newPage();
  page.setDefaultTimeout(30_000);
  const errors: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') errors.push(`${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => errors.push(`pageerror: ${e.message}`));
  page.on('dialog', (d) => {
    errors.push(`dialog: ${d.message()}`);
    void d.dismiss();
  });
  await page.goto(url, { waitUntil: 'load' });
  return { page, context, errors };
}

async function go(page: Page, hash: string): Promise<void> {
  await page.evaluate((h) => {
    (globalThis as any).location.hash = h;
  }, hash);
  await page.waitForFunction((h) => (globalThis as any).location.hash === h, hash);
}

async function shot(page: Page, name: string, fullPage = true): Promise<void> {
  const file = path.join(SHOTS, `${name}.png`);
  await page.screenshot({ path: file, fullPage });
  expect(readFileSync(file).subarray(1, 4).toString('latin1')).toBe('PNG');
}

/** Monday 00:00 UTC of the week holding `ms` (independent of src/trends: plain Date arithmetic). */
function mondayOf(ms: number): number {
  const day = Math.floor(ms / 86_400_000);
  // 1970-01-01 was a Thursday: day 0 → weekday 3 counting from Monday.
  return (day - ((day + 3) % 7)) * 86_400_000;
}

describe('document reader, column filters, coarser cut and trends on the tiny dated report', () => {
  const data = tinyReport({ dated: true });
  let o: Opened;
  beforeAll(async () => {
    o = await open(renderReport(data));
  });
  afterAll(async () => {
    await o?.context.close();
  });

  it('opens a document from its id: text with the group’s terms marked, fit, next group and margin, columns, near-copies', async () => {
    await go(o.page, '#documents');
    await o.page.locator('#documents table.rows a[href="#doc-1"]').click();
    await o.page.waitForFunction(() => (globalThis as any).location.hash === '#doc-1');
    const d = data.documents[1];
    const view = o.page.locator('#document');
    expect(await view.locator('h2').textContent()).toBe(d.title);
    const facts = await view.locator('dl.doc-facts div').evaluateAll((ds: any[]) => ds.map((x) => [x.children[0].textContent, x.children[1].textContent]));
    expect(facts).toEqual([
      ['ID', d.id],
      ['Group', `${d.group}${data.groups[d.group].label}`],
      ['Fit', `${formatFixed(d.fit, 3)} (cosine to the group’s centre)`],
      ['Next closest group', `${d.next}${data.groups[d.next!].label}`],
      ['Margin', `${formatFixed(d.margin, 3)} (fit minus the cosine to the next group)`],
      ['Period', d.period!],
    ]);
    expect(await view.locator('dl.doc-columns div').evaluateAll((ds: any[]) => ds.map((x) => x.textContent))).toEqual([`channel${d.fields![0]}`, `created${d.fields![1]}`]);
    // Marked: every word of the text that starts with one of the group's terms (counted here from the text).
    const terms = data.groups[d.group].terms.map((t) => t.term);
    const words = d.text!.split(/\s+/).filter((w) => terms.some((t) => w.toLowerCase().startsWith(t)));
    expect(await view.locator('.doc-text mark').allTextContents()).toEqual(words);
    expect(await view.locator('.doc-text').textContent()).toBe(d.text);
    // T-102 is a near-copy of T-101 (set 0).
    expect(await view.locator('ul.near li a').allTextContents()).toEqual([data.documents[0].title]);
    await shot(o.page, 'reader-document');
  });

  it('shows the text as written and as cleaned when cleaning changed it', async () => {
    await go(o.page, '#doc-0');
    const view = o.page.locator('#document');
    expect(await view.locator('.doc-text').textContent()).toBe(data.documents[0].text);
    await view.getByRole('button', { name: 'As analysed (cleaned)' }).click();
    expect(await view.locator('.doc-text').textContent()).toBe(data.documents[0].cleaned);
  });

  it('filters all documents by a column of the export, by fit and by near-copies', async () => {
    await go(o.page, '#documents');
    const view = o.page.locator('#documents');
    await view.locator('fieldset.filters select').nth(2).selectOption({ label: 'channel' });
    await view.locator('fieldset.filters input[type="text"]').fill('chat');
    const chat = data.documents.filter((d) => d.fields![0] === 'chat').map((d) => d.id);
    expect(chat.length).toBe(4);
    await expect.poll(() => view.locator('table.rows').getAttribute('data-count')).toBe(String(chat.length));
    expect(await view.locator('table.rows tbody td:first-child').allTextContents()).toEqual(chat);
    await shot(o.page, 'filters-column');
    // And fit ≥ 0.8 on top.
    await view.locator('fieldset.filters input[type="number"]').first().fill('0.8');
    const both = data.documents.filter((d) => d.fields![0] === 'chat' && Number.isFinite(d.fit) && Number(d.fit.toFixed(3)) >= 0.8).map((d) => d.id);
    await expect.poll(() => view.locator('table.rows').getAttribute('data-count')).toBe(String(both.length));
    await view.getByRole('button', { name: 'Clear filters' }).click();
    await view.locator('fieldset.filters select').nth(1).selectOption('in');
    await expect.poll(() => view.locator('table.rows').getAttribute('data-count')).toBe('4');
    await view.getByRole('button', { name: 'Clear filters' }).click();
    await view.locator('fieldset.filters select').first().selectOption('none');
    await expect.poll(() => view.locator('table.rows').getAttribute('data-count')).toBe('1');
    await view.getByRole('button', { name: 'Clear filters' }).click();
  });

  it('cuts the tree coarser: two groups, the merged one named from the summed term weights, and lists its documents', async () => {
    await go(o.page, '#tree');
    const cut = o.page.locator('#tree .cut');
    await cut.locator('input[type="range"]').fill('2');
    expect(await cut.locator('output').textContent()).toBe('2 groups');
    const merges = data.tree!.merges;
    const [a, b] = [merges[0].left, merges[0].right];
    // Merged name, counted here: term weight × group size summed over the two groups, top three.
    const sum = new Map<string, number>();
    for (const g of [a, b]) for (const t of data.groups[g].terms) sum.set(t.term, (sum.get(t.term) ?? 0) + t.weight * data.groups[g].size);
    const name = [...sum].sort((x, y) => y[1] - x[1] || (x[0] < y[0] ? -1 : 1)).slice(0, 3).map((x) => x[0]).join(' · ');
    const rows = await cut.locator('tbody tr').evaluateAll((trs: any[]) => trs.map((tr) => [tr.children[0].textContent, tr.children[1].textContent, tr.getAttribute('data-groups')]));
    const mergedSize = data.groups[a].size + data.groups[b].size;
    const other = [0, 1, 2].find((g) => g !== a && g !== b)!;
    expect(rows).toEqual([
      [`${name} (merged)`, String(mergedSize), [a, b].sort().join(' ')],
      [data.groups[other].label, String(data.groups[other].size), String(other)],
    ]);
    await shot(o.page, 'tree-coarser');
    await cut.getByRole('button', { name: 'List documents' }).first().click();
    await o.page.waitForFunction(() => (globalThis as any).location.hash === '#documents');
    await expect.poll(() => o.page.locator('#documents table.rows').getAttribute('data-count')).toBe(String(mergedSize));
    await o.page.locator('#documents').getByRole('button', { name: 'Clear filters' }).click();
    // Finer again: all three groups, none merged.
    await go(o.page, '#tree');
    await cut.locator('input[type="range"]').fill('3');
    expect(await cut.locator('tbody tr').count()).toBe(3);
  });

  it('counts per group per ISO week match a count made here from the created column', async () => {
    await go(o.page, '#trends');
    const t = data.trends!;
    // Independent count: Date.parse of each ISO value, Monday of its week, group.
    const weeks = new Map<number, number[]>();
    data.documents.forEach((d) => {
      const ms = Date.parse(d.fields![1]);
      if (Number.isNaN(ms) || d.group < 0) return;
      const m = mondayOf(ms);
      if (!weeks.has(m)) weeks.set(m, [0, 0, 0]);
      weeks.get(m)![d.group]++;
    });
    const mondays = [...weeks.keys()].sort((x, y) => x - y);
    const first = mondays[0];
    const last = mondays[mondays.length - 1];
    const span = (last - first) / (7 * 86_400_000) + 1;
    expect(t.granularity).toBe('week');
    expect(t.periods).toHaveLength(span);
    const rows = await o.page.locator('#trends table.counts-grid tbody tr').evaluateAll((trs: any[]) =>
      trs.map((tr) => Array.from(tr.querySelectorAll('td') as ArrayLike<any>).map((td: any) => Number(td.textContent))),
    );
    for (let g = 0; g < 3; g++) {
      const expected = Array.from({ length: span }, (_, w) => weeks.get(first + w * 7 * 86_400_000)?.[g] ?? 0);
      expect(rows[g]).toEqual(expected);
    }
    // 2029-01-01 is a Monday: the first period is ISO week 2029-W01.
    expect(t.periods[0]).toBe('2029-W01');
    // The trend line of each group carries its counts.
    const labels = await o.page.locator('#trends table.trends svg.spark').evaluateAll((ss: any[]) => ss.map((s) => s.getAttribute('aria-label')));
    expect(labels).toEqual(rows.map((r: number[], g: number) => `Group ${g} per period: ${r.join(', ')}`));
    await shot(o.page, 'trends');
    expect(o.errors).toEqual([]);
  });

  it('relations: the threshold slider shows only the pairs at or above it', async () => {
    await go(o.page, '#relations');
    const sims = [data.similarity![1], data.similarity![2], data.similarity![5]];
    await o.page.locator('#sim-threshold').fill('0');
    expect(await o.page.locator('line.sim-edge:not([visibility])').count()).toBe(3);
    const mid = Number(((sims.slice().sort()[1] + sims.slice().sort()[2]) / 2).toFixed(2));
    await o.page.locator('#sim-threshold').fill(String(mid));
    const above = sims.filter((v) => Number(v.toFixed(3)) >= mid).length;
    expect(await o.page.locator('line.sim-edge:not([visibility])').count()).toBe(above);
    expect(await o.page.locator('#sim-count').textContent()).toBe(`${above} ${above === 1 ? 'line' : 'lines'}`);
  });
});

/** A full run on the demo tickets: texts, columns, trends by `created`, scores against `category`, near-copies. */
async function fullDemo(): Promise<ReportData> {
  const read = await ingest(['corpus-demo/tickets.csv'], { text: ['subject', 'body'], id: 'ticket_id', title: 'subject' }, { cwd: REPO_ROOT });
  const result = groupDocuments(read, { groups: 8 });
  const near = nearCopiesOfVectors(result.docs, result.matrix, resolveFindDuplicatesOptions({ threshold: 0.8, show: 50 }));
  const unsorted = new Set(result.unsorted.rows);
  const evaluation = evaluateLabels(
    'category',
    result.docs.map((d) => d.fields.get('category') ?? ''),
    Array.from(result.partition.assignments, (g, r) => (g >= 0 ? String(g) : unsorted.has(r) ? 'unsorted' : '')),
  );
  const trends = groupTrends(result.docs.map((d) => d.fields.get('created') ?? ''), result.partition.assignments, result.partition.groups);
  return reportFromRun(result, near, { threshold: 0.8, by: 'cosine of TF-IDF vectors' }, {
    title: 'sheaf — tickets.csv',
    createdAt: '2029-11-01T09:00:00.000Z',
    version: '0.1.0',
    skipped: 0,
    originals: read.docs.map((d) => d.text),
    evaluation,
    trends: { column: 'created', zone: 'UTC', trends },
  });
}

describe('the demo tickets with every view', () => {
  let data: ReportData;
  let html: string;
  beforeAll(async () => {
    data = await fullDemo();
    html = renderReport(data);
  }, 120_000);

  it('scores and where each label went: the label × group table matches a count made here', async () => {
    const o = await open(html);
    try {
      await go(o.page, '#scores');
      const counts = new Map<string, Map<string, number>>();
      data.documents.forEach((d, i) => {
        const label = d.fields![data.columns!.indexOf('category')];
        if (d.group < 0 || label === '') return;
        if (!counts.has(label)) counts.set(label, new Map());
        counts.get(label)!.set(String(d.group), (counts.get(label)!.get(String(d.group)) ?? 0) + 1);
        expect(i).toBeGreaterThanOrEqual(0);
      });
      const rows = await o.page.locator('#scores table.label-grid tbody tr').evaluateAll((trs: any[]) =>
        trs.map((tr) => [tr.children[0].textContent, Array.from(tr.querySelectorAll('td') as ArrayLike<any>).slice(1).map((td: any) => td.textContent)]),
      );
      expect(rows).toHaveLength(counts.size);
      for (const [label, cells] of rows as [string, string[]][]) {
        const want = data.groups.map((g) => counts.get(label)!.get(String(g.id)) ?? 0);
        expect(cells.map((c) => (c === '·' ? 0 : Number(c.replace(/,/g, ''))))).toEqual(want);
      }
      const dds = await o.page.locator('#scores dl.counts dd').allTextContents();
      expect(dds[0]).toBe(formatFixed(data.evaluation!.scores[0].value, 3));
      await shot(o.page, 'scores');
      await go(o.page, '#relations');
      await shot(o.page, 'relations-matrix');
      await go(o.page, '#group-0');
      await shot(o.page, 'group-terms', false);
      await go(o.page, '#doc-3');
      await shot(o.page, 'reader-demo');
      const set = data.duplicates!.sets.find((s) => s.members.some((m) => m.diff?.some((p) => p.kind !== 'same')))!;
      await go(o.page, `#set-${set.id}`);
      await shot(o.page, 'near-copy-diff');
      await go(o.page, '#trends');
      await shot(o.page, 'trends-demo');
      expect(o.errors).toEqual([]);
    } finally {
      await o.context.close();
    }
  });

  it('at 420 px wide: lists become cards and no view scrolls sideways', async () => {
    const o = await open(html, 420);
    try {
      for (const hash of ['#documents', '#group-1', '#trends', '#doc-5', '#scores', '#tree']) {
        await go(o.page, hash);
        const wide = await o.page.evaluate(() => {
          const d = (globalThis as any).document;
          // Wide charts and the label grid scroll inside their own boxes; the page itself must not.
          return d.documentElement.scrollWidth as number;
        });
        expect(wide, hash).toBeLessThanOrEqual(420);
      }
      await go(o.page, '#documents');
      const display = await o.page.locator('#documents table.rows td').first().evaluate((td: any) => (globalThis as any).getComputedStyle(td).display);
      expect(display).toBe('grid');
      expect(await o.page.locator('#documents table.rows td').first().getAttribute('data-label')).toBe('ID');
      await shot(o.page, 'narrow-420-documents', false);
      await go(o.page, '#trends');
      await shot(o.page, 'narrow-420-trends', false);
      expect(o.errors).toEqual([]);
    } finally {
      await o.context.close();
    }
  });
});

describe('the report of sheaf duplicates', () => {
  it('lists the sets, opens a set and a member’s text', async () => {
    const read = await ingest(['corpus-demo/tickets.csv'], { text: ['subject', 'body'], id: 'ticket_id', title: 'subject' }, { cwd: REPO_ROOT });
    const run = findDuplicates(read.docs, { threshold: 0.8, show: 20 });
    const data = duplicatesReportData(run, { title: 'sheaf near-copies — tickets.csv', createdAt: '2029-11-01T09:00:00.000Z', version: '0.1.0', skipped: 0 });
    const inSets = run.sets.reduce((a, s) => a + s.members.length, 0);
    expect(data.documents).toHaveLength(inSets);
    const o = await open(renderReport(data));
    try {
      expect(await o.page.locator('nav.views a').allTextContents()).toEqual(['Near-duplicate sets', 'Documents in sets']);
      expect(await o.page.locator('#duplicates table.rows').getAttribute('data-count')).toBe(String(run.sets.length));
      await shot(o.page, 'duplicates-report');
      await go(o.page, '#set-0');
      const first = o.page.locator('#duplicate-set article.member h3 a').first();
      const title = await first.textContent();
      await first.click();
      await o.page.waitForFunction(() => /^#doc-\d+$/.test((globalThis as any).location.hash));
      expect(await o.page.locator('#document h2').textContent()).toBe(title);
      expect((await o.page.locator('#document .doc-text').textContent())!.length).toBeGreaterThan(10);
      await go(o.page, '#documents');
      expect(await o.page.locator('#documents table.rows').getAttribute('data-count')).toBe(String(inSets));
      expect(await o.page.locator('#documents thead th').allTextContents()).toEqual(['ID', 'Title', 'Near-duplicate set', ...data.columns!]);
      expect(o.errors).toEqual([]);
    } finally {
      await o.context.close();
    }
  }, 120_000);
});

describe('hostile text in the new places never runs', () => {
  const data = tinyReport({ hostile: true, dated: true });
  const html = renderReport(data);

  it('columns, column values, texts, unparsed dates, ids in the reader, filters, trends and scores', async () => {
    const withScores: ReportData = {
      ...data,
      evaluation: {
        field: HOSTILE.close,
        scored: 11,
        leftOut: 1,
        scores: [{ name: HOSTILE.img, value: 0.5 }],
        contingency: [{ label: HOSTILE.script, size: 4, groups: [{ group: '0', count: 4 }] }],
      },
    };
    const o = await open(renderReport(withScores));
    try {
      const pwned = () => o.page.evaluate(() => (globalThis as any).__pwned);
      for (const hash of ['#doc-0', '#doc-2', '#doc-3', '#documents', '#trends', '#scores', '#tree', '#relations']) {
        await go(o.page, hash);
        expect(await pwned(), hash).toBeUndefined();
      }
      await go(o.page, '#doc-0');
      // The hostile column name and value show as text.
      expect(await o.page.locator('#document dl.doc-columns dt').allTextContents()).toEqual([HOSTILE.img, 'created']);
      expect(await o.page.locator('#document dl.doc-columns dd').first().textContent()).toBe(HOSTILE.comment);
      await go(o.page, '#doc-2');
      expect(await o.page.locator('#document .doc-text').textContent()).toContain(HOSTILE.img);
      await go(o.page, '#doc-3');
      expect(await o.page.locator('#document dl.doc-facts dd').first().textContent()).toBe(HOSTILE.attr);
      // The document with a hostile date is listed as unparsed, by its hostile id, as text.
      await go(o.page, '#trends');
      expect(await o.page.locator('#trends p.notice code').allTextContents()).toEqual([HOSTILE.attr]);
      await go(o.page, '#documents');
      const view = o.page.locator('#documents');
      expect(await view.locator('thead th').allTextContents()).toContain(HOSTILE.img);
      await view.locator('fieldset.filters select').nth(2).selectOption({ index: 1 });
      await view.locator('fieldset.filters input[type="text"]').fill('<!--');
      await expect.poll(() => view.locator('table.rows').getAttribute('data-count')).toBe('1');
      await go(o.page, '#scores');
      expect(await o.page.locator('#scores table.label-grid th[scope="row"]').textContent()).toBe(HOSTILE.script);
      expect(await o.page.locator('#scores dl.counts dt').textContent()).toBe(HOSTILE.img);
      expect(await pwned()).toBeUndefined();
      const shape = await o.page.evaluate(() => {
        const d = (globalThis as any).document;
        const all = Array.from(d.querySelectorAll('*') as ArrayLike<any>);
        return {
          embedded: d.querySelectorAll('img, iframe, object, embed, link, base, form').length as number,
          handlers: all.flatMap((el: any) => Array.from(el.attributes as ArrayLike<any>).map((a: any) => a.name as string)).filter((n) => n.startsWith('on')),
          outsideLinks: all.filter((el: any) => el.hasAttribute('href') && !el.getAttribute('href').startsWith('#')).length,
        };
      });
      expect(shape).toEqual({ embedded: 0, handlers: [], outsideLinks: 0 });
      expect(o.errors).toEqual([]);
    } finally {
      await o.context.close();
    }
  });

  it('a link to a file is kept only as sheaf writes it (relative path or file: URL), never as another scheme', async () => {
    const linked: ReportData = {
      ...tinyReport(),
      documents: tinyReport().documents.map((d, i) => ({ ...d, ...(i === 0 ? { link: HOSTILE.url } : i === 1 ? { link: '..%2Fnotes%2Fa%20b.md' } : {}) })),
    };
    const o = await open(renderReport(linked));
    try {
      await go(o.page, '#doc-0');
      expect(await o.page.locator('#document dl.doc-facts a[href^="javascript"]').count()).toBe(0);
      expect(await o.page.locator('#document dl.doc-facts dt').allTextContents()).not.toContain('File');
      await go(o.page, '#doc-1');
      expect(await o.page.locator('#document dl.doc-facts a').last().getAttribute('href')).toBe('..%2Fnotes%2Fa%20b.md');
      expect(formatCount(1)).toBe('1');
    } finally {
      await o.context.close();
    }
  });
});

describe('100,000 documents with texts', () => {
  it('opens without parsing the texts, reads one document, and searches the texts', async () => {
    const { largeReport } = await import('./helpers/browser.js');
    const n = 100_000;
    const base = largeReport(n, 20);
    // Every 7th document's text holds the word "kelp" (titles never do).
    const data: ReportData = {
      ...base,
      documents: base.documents.map((d, i) => ({ ...d, text: `Ticket ${i}: the ${i % 7 === 0 ? 'kelp' : 'rope'} near berth ${i % 97} needs a look.` })),
    };
    const html = renderReport(data);
    const o = await open(html);
    try {
      // No text block is parsed before a document is opened or searched: the page's data block has no text in it.
      expect(o.errors).toEqual([]);
      await go(o.page, '#doc-99999');
      expect(await o.page.locator('#document .doc-text').textContent()).toBe(data.documents[99_999].text);
      await go(o.page, '#group-0');
      const view = o.page.locator('#group-0');
      await view.locator('input[type="search"]').fill('kelp');
      // Group 0 holds i ≡ 0 (mod 20); of those, the ones with i ≡ 0 (mod 7): i ≡ 0 (mod 140).
      await expect.poll(() => view.locator('table.rows').getAttribute('data-count'), { timeout: 60_000 }).toBe(String(Math.ceil(n / 140)));
      expect(o.errors).toEqual([]);
    } finally {
      await o.context.close();
    }
  }, 180_000);
});
