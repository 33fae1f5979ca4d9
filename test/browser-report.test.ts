/**
 * The HTML report in a real browser: Debian's Chromium (/usr/bin/chromium)
 * driven by playwright-core, the page opened from a file:// URL.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { mkdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { renderReport } from '../src/report/html.js';
import { formatCount, formatFixed, roundOrNull } from '../src/report/html-escape.js';
import type { ReportData } from '../src/report/report-data.js';
import { PAYLOAD_DIGITS } from '../src/report/html-payload.js';
import { HOSTILE, demoReport, largeReport, launchBrowser, tinyReport, writeTempHtml } from './helpers/browser.js';

/* eslint-disable @typescript-eslint/no-explicit-any -- page callbacks run in the browser, where DOM types exist */

/** Screenshots land here (stable path, overwritten on each run). */
const SHOT_DIR = path.join(tmpdir(), 'sheaf-report-screens');

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

interface Opened {
  page: Page;
  context: BrowserContext;
  url: string;
  /** Console errors and warnings, uncaught page errors. */
  errors: string[];
  dialogs: string[];
  requests: string[];
}

async function open(html: string, options: { bypassCSP?: boolean } = {}): Promise<Opened> {
  const { url } = writeTempHtml(html);
  const context = await browser.newContext({
    bypassCSP: options.bypassCSP ?? false,
    locale: 'en-US',
    viewport: { width: 1200, height: 900 },
  });
  const page = await context.newPage();
  page.setDefaultTimeout(30_000);
  const errors: string[] = [];
  const dialogs: string[] = [];
  const requests: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') errors.push(`${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => errors.push(`pageerror: ${e.message}`));
  page.on('dialog', (d) => {
    dialogs.push(d.message());
    void d.dismiss();
  });
  page.on('request', (r) => requests.push(r.url()));
  await page.addInitScript(() => {
    const w = globalThis as any;
    w.__violations = [];
    w.document.addEventListener('securitypolicyviolation', (e: any) => w.__violations.push(`${e.violatedDirective} ${e.blockedURI}`));
  });
  await page.goto(url, { waitUntil: 'load' });
  return { page, context, url, errors, dialogs, requests };
}

async function go(page: Page, hash: string): Promise<void> {
  await page.evaluate((h) => {
    (globalThis as any).location.hash = h;
  }, hash);
  await page.waitForFunction((h) => (globalThis as any).location.hash === h, hash);
}

async function visibleViews(page: Page): Promise<string[]> {
  return page.evaluate(() =>
    Array.from((globalThis as any).document.querySelectorAll('section.view') as ArrayLike<any>)
      .filter((s: any) => !s.hidden)
      .map((s: any) => s.id as string),
  );
}

function isPng(file: string): number {
  const bytes = readFileSync(file);
  expect(bytes.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))).toBe(true);
  return bytes.length;
}

/** Sorting as the page does it: embedded (rounded) values, ties by input order. */
function groupRowsByFit(data: ReportData, group: number): number[] {
  const rows = data.documents.map((_, i) => i).filter((i) => data.documents[i].group === group);
  const fit = (i: number) => roundOrNull(data.documents[i].fit, PAYLOAD_DIGITS) ?? -Infinity;
  return rows.sort((a, b) => fit(b) - fit(a) || a - b);
}

describe('report of a real run on the demo tickets (corpus-demo/tickets.csv, 8 groups)', () => {
  let data: ReportData;
  let o: Opened;
  beforeAll(async () => {
    data = await demoReport(8);
    o = await open(renderReport(data));
  });
  afterAll(async () => {
    await o?.context.close();
  });

  it('loads offline: the file itself is the only request, no errors, no CSP violations', async () => {
    expect(o.requests).toEqual([o.url]);
    expect(o.errors).toEqual([]);
    expect(await o.page.evaluate('window.__violations')).toEqual([]);
    expect(await visibleViews(o.page)).toEqual(['overview']);
    expect(await o.page.title()).toBe(`Overview — ${data.title}`);
  });

  it('overview: every group with its label and size, largest first', async () => {
    const bySize = data.groups.slice().sort((a, b) => b.size - a.size || a.id - b.id);
    const links = o.page.locator('#overview svg.sizes-chart a');
    expect(await links.count()).toBe(data.groups.length);
    expect(await links.evaluateAll((as: any[]) => as.map((a) => a.getAttribute('aria-label')))).toEqual(
      bySize.map((g) => `Group ${g.id}: ${g.label}, ${formatCount(g.size)} documents, cohesion ${formatFixed(g.cohesion, 3)}`),
    );
    const labels = await o.page.locator('#overview svg.sizes-chart text.bar-label').evaluateAll((ts: any[]) =>
      ts.map((t) => [t.firstChild.textContent, t.firstChild.nextSibling.textContent]),
    );
    // The number apart (its own tspan), then the name.
    expect(labels).toEqual(bySize.map((g) => [String(g.id), ` ${g.label}`]));
    const values = await o.page.locator('#overview svg.sizes-chart a text.bar-value').allTextContents();
    expect(values.filter((_, i) => i % 2 === 0)).toEqual(bySize.map((g) => formatCount(g.size)));
    expect(await o.page.locator('#overview dl.counts dd').first().textContent()).toBe(formatCount(data.counts.documents));
  });

  it('clicking a group opens its page with its document count and rows by fit', async () => {
    const g = data.groups.slice().sort((a, b) => b.size - a.size)[0];
    await o.page.locator(`#overview svg.sizes-chart a[href="#group-${g.id}"]`).click();
    await o.page.waitForFunction((h) => (globalThis as any).location.hash === h, `#group-${g.id}`);
    expect(await visibleViews(o.page)).toEqual([`group-${g.id}`]);
    const view = o.page.locator(`#group-${g.id}`);
    expect(await view.locator('h2 .gno').textContent()).toBe(String(g.id));
    expect(await view.locator('h2').textContent()).toBe(`${g.id} ${g.label}`);
    expect(await view.locator('table.rows').getAttribute('data-count')).toBe(String(g.size));
    expect(await view.locator('p.status').textContent()).toBe(`Showing 1–${Math.min(50, g.size)} of ${formatCount(g.size)} documents.`);
    const expected = groupRowsByFit(data, g.id).slice(0, 50);
    expect(await view.locator('table.rows tbody tr td:first-child').allTextContents()).toEqual(expected.map((i) => data.documents[i].id));
    expect(await view.locator('table.rows tbody tr td:nth-child(3)').allTextContents()).toEqual(
      expected.map((i) => formatFixed(data.documents[i].fit, 3)),
    );
    expect(await view.locator('th[aria-sort="descending"]').textContent()).toBe('Fit');
  });

  it('searching filters the rows of a group (ids, titles, columns and texts)', async () => {
    const g = data.groups.slice().sort((a, b) => b.size - a.size)[0];
    const rows = data.documents.filter((d) => d.group === g.id);
    // The commonest word of 4+ letters in this group's titles.
    const tally = new Map<string, number>();
    for (const d of rows) for (const w of new Set(d.title.toLowerCase().match(/[a-z]{4,}/g) ?? [])) tally.set(w, (tally.get(w) ?? 0) + 1);
    const q = [...tally.entries()].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1))[0][0];
    const expected = rows.filter((d) => [d.id, d.title, ...(d.fields ?? []), d.text ?? ''].join('\n').toLowerCase().includes(q));
    expect(expected.length).toBeGreaterThan(0);
    expect(expected.length).toBeLessThan(rows.length);
    const view = o.page.locator(`#group-${g.id}`);
    await view.locator('input[type="search"]').fill(q.toUpperCase());
    await expect.poll(() => view.locator('table.rows').getAttribute('data-count'), { timeout: 10_000 }).toBe(String(expected.length));
    const titles = await view.locator('table.rows tbody tr td:nth-child(2)').allTextContents();
    expect(titles.length).toBe(Math.min(50, expected.length));
    expect(await view.locator('p.status').textContent()).toContain(`matching “${q.toUpperCase()}” (of ${formatCount(rows.length)})`);
    await view.locator('input[type="search"]').fill('');
    await expect.poll(() => view.locator('table.rows').getAttribute('data-count'), { timeout: 10_000 }).toBe(String(rows.length));
  });

  it('sorting by title and by id', async () => {
    const g = data.groups.slice().sort((a, b) => b.size - a.size)[0];
    const view = o.page.locator(`#group-${g.id}`);
    const collator = new Intl.Collator('en-US', { numeric: true, sensitivity: 'base' });
    const rows = data.documents.map((d, i) => ({ d, i })).filter((r) => r.d.group === g.id);
    await view.getByRole('button', { name: 'Title' }).click();
    expect(await view.locator('th[aria-sort="ascending"]').textContent()).toBe('Title');
    const byTitle = rows.slice().sort((a, b) => collator.compare(a.d.title, b.d.title) || a.i - b.i).slice(0, 50);
    expect(await view.locator('table.rows tbody tr td:nth-child(2)').allTextContents()).toEqual(byTitle.map((r) => r.d.title));
    await view.getByRole('button', { name: 'ID' }).click();
    await view.getByRole('button', { name: 'ID' }).click();
    expect(await view.locator('th[aria-sort="descending"]').textContent()).toBe('ID');
    const byIdDesc = rows.slice().sort((a, b) => -collator.compare(a.d.id, b.d.id) || a.i - b.i).slice(0, 50);
    expect(await view.locator('table.rows tbody tr td:first-child').allTextContents()).toEqual(byIdDesc.map((r) => r.d.id));
  });

  it('all documents: pages of 50 with next and previous', async () => {
    await o.page.locator('nav.views a[href="#documents"]').click();
    const view = o.page.locator('#documents');
    await expect.poll(() => visibleViews(o.page)).toEqual(['documents']);
    expect(await o.page.locator('nav.views a[aria-current="page"]').textContent()).toBe('All documents');
    const n = data.documents.length;
    expect(await view.locator('p.status').textContent()).toBe(`Showing 1–50 of ${formatCount(n)} documents.`);
    await view.getByRole('button', { name: 'Next →' }).click();
    expect(await view.locator('p.status').textContent()).toBe(`Showing 51–100 of ${formatCount(n)} documents.`);
    expect(await view.locator('.page-of').textContent()).toBe(`Page 2 of ${Math.ceil(n / 50)}`);
    expect(await view.locator('table.rows tbody tr td:first-child').first().textContent()).toBe(data.documents[50].id);
    await view.getByRole('button', { name: '← Previous' }).click();
    expect(await view.locator('table.rows tbody tr td:first-child').first().textContent()).toBe(data.documents[0].id);
    expect(await view.getByRole('button', { name: '← Previous' }).isDisabled()).toBe(true);
  });

  it('near-duplicates: the list of sets, and a set page with its word diff marked by <ins>/<del>, no bracket notation', async () => {
    const dup = data.duplicates!;
    await o.page.locator('nav.views a[href="#duplicates"]').click();
    const list = o.page.locator('#duplicates');
    await expect.poll(() => visibleViews(o.page)).toEqual(['duplicates']);
    expect(await list.locator('table.rows').getAttribute('data-count')).toBe(String(dup.sets.length));
    expect(await list.locator('table.rows tbody tr td:first-child').allTextContents()).toEqual(dup.sets.slice(0, 50).map((s) => `Set ${s.id}`));
    const set = dup.sets.find((s) => s.members.some((m) => m.diff?.some((p) => p.kind === 'added') && m.diff.some((p) => p.kind === 'removed')))!;
    expect(set).toBeDefined();
    await list.locator(`a[href="#set-${set.id}"]`).click();
    await expect.poll(() => visibleViews(o.page)).toEqual(['duplicate-set']);
    const view = o.page.locator('#duplicate-set');
    expect(await view.locator('h2').textContent()).toBe(`Near-duplicate set ${set.id}`);
    expect(await view.locator('article.member').count()).toBe(set.members.length);
    const withDiff = set.members.filter((m) => m.id !== set.representative);
    const diffs = await view.locator('p.diff').allTextContents();
    expect(diffs).toEqual(
      withDiff.map((m) =>
        m.diff!.map((p) => p.text).join(''),
      ),
    );
    const first = withDiff[0].diff!;
    const ins = await view.locator('article.member').nth(set.members.findIndex((m) => m.id === withDiff[0].id)).locator('ins').allTextContents();
    expect(ins).toEqual(first.filter((p) => p.kind === 'added').map((p) => p.text));
    expect(diffs.join('')).not.toMatch(/\{\+|\+\}|\[-|-\]/);
    // The marks are drawn by the style sheet (a filled corner for added words, a hollow one for removed).
    const marks = await view.locator('ins').first().evaluate((n: any) => (globalThis as any).getComputedStyle(n, '::before').content);
    expect(marks).toBe('"\u25B8"');
    const similarity = await view.locator('article.member p', { hasText: 'Similarity to the representative' }).first().textContent();
    expect(similarity).toBe(`Similarity to the representative: ${formatFixed(withDiff[0].similarity, 3)}`);
  });

  it('back and forward move between views (hash navigation)', async () => {
    const before = await o.page.evaluate(() => (globalThis as any).location.hash as string);
    expect(before).toMatch(/^#set-\d+$/);
    await o.page.goBack();
    await o.page.waitForFunction(() => (globalThis as any).location.hash === '#duplicates');
    expect(await visibleViews(o.page)).toEqual(['duplicates']);
    await o.page.goBack();
    await o.page.waitForFunction(() => (globalThis as any).location.hash === '#documents');
    expect(await visibleViews(o.page)).toEqual(['documents']);
    await o.page.goForward();
    await o.page.goForward();
    await o.page.waitForFunction((h) => (globalThis as any).location.hash === h, before);
    expect(await visibleViews(o.page)).toEqual(['duplicate-set']);
  });

  it('relations and tree draw every group; a leaf of the tree opens its group', async () => {
    await go(o.page, '#relations');
    expect(await o.page.locator('#relations svg.sim-matrix rect').count()).toBe(data.groups.length ** 2);
    expect(await o.page.locator('#relations svg.sim-graph circle').count()).toBe(data.groups.length);
    await go(o.page, '#tree');
    expect(await visibleViews(o.page)).toEqual(['tree']);
    expect(await o.page.locator('#tree svg path.branch').count()).toBe(data.tree!.merges.length);
    const leaves = o.page.locator('#tree svg a');
    expect(await leaves.count()).toBe(data.groups.length);
    const href = (await leaves.first().getAttribute('href'))!;
    await leaves.first().click();
    await o.page.waitForFunction((h) => (globalThis as any).location.hash === h, href);
    expect(await visibleViews(o.page)).toEqual([href.slice(1)]);
  });

  it('keyboard: Tab goes skip link, views, then the group links, with a visible focus ring; Enter opens the group', async () => {
    await o.page.goto(o.url);
    const focused = () =>
      o.page.evaluate(() => {
        const a = (globalThis as any).document.activeElement;
        const style = (globalThis as any).getComputedStyle(a);
        return { href: a.getAttribute('href') as string | null, text: (a.textContent as string).trim(), outline: `${style.outlineStyle} ${style.outlineWidth}` };
      });
    await o.page.keyboard.press('Tab');
    expect(await focused()).toEqual({ href: '#main', text: 'Skip to the content', outline: 'solid 3px' });
    const seen: (string | null)[] = [];
    let hit: { href: string | null; outline: string } | null = null;
    for (let i = 0; i < 30 && !hit; i++) {
      await o.page.keyboard.press('Tab');
      const f = await focused();
      seen.push(f.href);
      if (f.href && /^#group-\d+$/.test(f.href)) hit = f;
    }
    expect(seen.slice(0, 6)).toEqual(['#overview', '#relations', '#tree', '#documents', '#duplicates', hit?.href]);
    expect(hit).not.toBeNull();
    expect(hit!.outline).toBe('solid 3px');
    await o.page.keyboard.press('Enter');
    await o.page.waitForFunction((h) => (globalThis as any).location.hash === h, hit!.href);
    expect(await visibleViews(o.page)).toEqual([hit!.href!.slice(1)]);
    // Focus moved to the new view's heading.
    expect(await o.page.evaluate(() => (globalThis as any).document.activeElement.tagName)).toBe('H2');
  });

  it('the skip link moves focus to the content without changing the view or the hash', async () => {
    await o.page.goto(o.url);
    await go(o.page, '#relations');
    await o.page.locator('a.skip').focus();
    await o.page.keyboard.press('Enter');
    expect(await o.page.evaluate(() => (globalThis as any).document.activeElement.id)).toBe('main');
    expect(await o.page.evaluate(() => (globalThis as any).location.hash)).toBe('#relations');
    expect(await visibleViews(o.page)).toEqual(['relations']);
    // The next Tab lands on the first link inside the content: a row label of the similarity grid.
    await o.page.keyboard.press('Tab');
    expect(await o.page.evaluate(() => (globalThis as any).document.activeElement.getAttribute('href'))).toMatch(/^#group-\d+$/);
  });

  it('screenshots are real PNGs (overview, a group, a set)', async () => {
    mkdirSync(SHOT_DIR, { recursive: true });
    await go(o.page, '#overview');
    const overview = path.join(SHOT_DIR, 'demo-overview.png');
    await o.page.screenshot({ path: overview, fullPage: true });
    expect(isPng(overview)).toBeGreaterThan(30_000);
    await go(o.page, '#group-0');
    const group = path.join(SHOT_DIR, 'demo-group-0.png');
    await o.page.screenshot({ path: group, fullPage: true });
    expect(isPng(group)).toBeGreaterThan(30_000);
    const set = data.duplicates!.sets.find((s) => s.members.some((m) => m.diff?.some((p) => p.kind !== 'same')))!;
    await go(o.page, `#set-${set.id}`);
    const setShot = path.join(SHOT_DIR, 'demo-set.png');
    await o.page.screenshot({ path: setShot, fullPage: true });
    expect(isPng(setShot)).toBeGreaterThan(10_000);
    expect(o.errors).toEqual([]);
    expect(await o.page.evaluate('window.__violations')).toEqual([]);
  });
});

describe('hostile titles, ids, labels and terms', () => {
  const data = tinyReport({ hostile: true });
  const html = renderReport(data);
  const hashes = ['#overview', '#relations', '#doc-0', '#doc-2', '#doc-3', '#tree', '#documents', '#ungrouped', '#group-0', '#group-1', '#group-2', '#duplicates', '#set-0', '#set-1'];

  for (const bypassCSP of [false, true]) {
    it(`no script from the data runs, no dialog opens${bypassCSP ? ' (CSP switched off: escaping alone)' : ' (CSP on)'}`, async () => {
      const o = await open(html, { bypassCSP });
      try {
        for (const h of hashes) {
          await go(o.page, h);
          // Let any injected handler (onerror, onload, onfocus) fire.
          await o.page.waitForTimeout(50);
        }
        await go(o.page, '#documents');
        await o.page.locator('#documents input[type="search"]').fill(HOSTILE.img);
        // The query is the exact title of one document, which must be the one row found.
        await expect.poll(() => o.page.locator('#documents p.status').textContent()).toBe(
          `Showing 1–1 of 1 documents matching “${HOSTILE.img}” (of 12).`,
        );
        expect(await o.page.locator('#documents table.rows tbody td:nth-child(2)').allTextContents()).toEqual([HOSTILE.img]);
        await o.page.evaluate((h) => {
          (globalThis as any).location.hash = h;
        }, encodeURIComponent(HOSTILE.img));
        await o.page.locator('#route-notice').waitFor({ state: 'visible' });
        await o.page.waitForTimeout(200);
        expect(await o.page.evaluate('window.__pwned')).toBeUndefined();
        expect(o.dialogs).toEqual([]);
        expect(o.errors).toEqual([]);
        expect(await o.page.evaluate('window.__violations')).toEqual([]);
        expect(o.requests).toEqual([o.url]);
        const shape = await o.page.evaluate(() => {
          const d = (globalThis as any).document;
          const all = Array.from(d.querySelectorAll('*') as ArrayLike<any>);
          return {
            scripts: d.scripts.length as number,
            embedded: d.querySelectorAll('img, iframe, object, embed, link, base, form').length as number,
            handlers: all.flatMap((el: any) => Array.from(el.attributes as ArrayLike<any>).map((a: any) => a.name as string)).filter((n) => n.startsWith('on')),
            outsideLinks: all.filter((el: any) => el.hasAttribute('href') && !el.getAttribute('href').startsWith('#')).length,
          };
        });
        expect(shape).toEqual({ scripts: 3, embedded: 0, handlers: [], outsideLinks: 0 });
        // The unknown view name is shown literally.
        expect(await o.page.locator('#route-notice').textContent()).toBe(`This report has no view called “${HOSTILE.img}”; showing the overview.`);
      } finally {
        await o.context.close();
      }
    });
  }

  it('hostile text shows literally wherever it is used', async () => {
    const o = await open(html);
    try {
      expect(await o.page.locator('h1').textContent()).toBe(data.title);
      expect(await o.page.title()).toBe(`Overview — ${data.title}`);
      await go(o.page, '#group-0');
      expect(await o.page.locator('#group-0 h2').textContent()).toBe(`0 ${HOSTILE.close}`);
      const titles = await o.page.locator('#group-0 table.rows tbody td:nth-child(2)').allTextContents();
      expect(titles).toEqual(expect.arrayContaining([HOSTILE.script, HOSTILE.close, HOSTILE.img]));
      expect(await o.page.locator('#group-0 table.terms td strong').first().textContent()).toBe(HOSTILE.svg);
      await go(o.page, '#documents');
      const ids = await o.page.locator('#documents table.rows tbody td:first-child').allTextContents();
      expect(ids).toEqual(data.documents.map((d) => d.id));
      expect(ids).toContain(HOSTILE.attr);
      const rest = await o.page.locator('#documents table.rows tbody td:nth-child(2)').allTextContents();
      expect(rest).toContain(HOSTILE.lineSep);
      expect(rest).toContain(HOSTILE.url);
      await go(o.page, '#set-0');
      expect(await o.page.locator('#duplicate-set article.member h3').allTextContents()).toEqual([HOSTILE.script, HOSTILE.close]);
      expect(await o.page.locator('#duplicate-set-body > p strong').textContent()).toBe(HOSTILE.script);
      await go(o.page, '#overview');
      const settings = await o.page.locator('#overview table.settings td').allTextContents();
      expect(settings).toEqual(expect.arrayContaining([HOSTILE.attr, HOSTILE.script]));
      expect(o.errors).toEqual([]);
    } finally {
      await o.context.close();
    }
  });
});

describe('views degrade without a tree or near-duplicates', () => {
  it('says what is missing and leaves the duplicate column out', async () => {
    const data = tinyReport({ tree: false, duplicates: false });
    const o = await open(renderReport(data));
    try {
      await go(o.page, '#tree');
      expect(await o.page.locator('#tree p').textContent()).toBe('No tree was built for this run.');
      await go(o.page, '#set-0');
      expect(await o.page.locator('#duplicate-set-body').textContent()).toBe('Near-duplicates were not searched for in this run.');
      await go(o.page, '#documents');
      expect(await o.page.locator('#documents thead th').allTextContents()).toEqual(['ID', 'Title', 'Fit', 'Group', 'Margin', 'channel', 'created']);
      await go(o.page, '#ungrouped');
      expect(await o.page.locator('#ungrouped table.rows tbody td:first-child').allTextContents()).toEqual(['T-112']);
      expect(o.errors).toEqual([]);
    } finally {
      await o.context.close();
    }
  });
});

describe('100,000 documents', () => {
  it('opens, lists a group, searches and pages over the embedded data', async () => {
    const n = 100_000;
    const k = 20;
    const data = largeReport(n, k);
    const html = renderReport(data);
    const o = await open(html);
    try {
      expect(o.errors).toEqual([]);
      await go(o.page, '#group-3');
      const view = o.page.locator('#group-3');
      expect(await view.locator('table.rows').getAttribute('data-count')).toBe(String(n / k));
      expect(await view.locator('table.rows tbody tr').count()).toBe(50);
      // Titles are "Doc i about <words[i % 8]>"; group 3 holds i ≡ 3 (mod 20), so i % 8 is 3 or 7: parcel or account.
      await view.locator('input[type="search"]').fill('about parcel');
      const expected = data.documents.filter((d) => d.group === 3 && d.title.includes('about parcel')).length;
      expect(expected).toBe(2500);
      await expect.poll(() => view.locator('table.rows').getAttribute('data-count'), { timeout: 20_000 }).toBe(String(expected));
      await go(o.page, '#documents');
      await o.page.locator('#documents').getByRole('button', { name: 'Next →' }).click();
      expect(await o.page.locator('#documents p.status').textContent()).toBe(`Showing 51–100 of ${formatCount(n)} documents.`);
      expect(o.errors).toEqual([]);
    } finally {
      await o.context.close();
    }
  });
});

describe('without Chromium', () => {
  it('the browser tests fail with a message saying what to install', async () => {
    await expect(launchBrowser('/nonexistent/chromium')).rejects.toThrow(
      "Chromium is not installed at /nonexistent/chromium; the report's browser tests need it (Debian: apt-get install -y chromium).",
    );
  });
});
