/**
 * The demo run (`npm run demo`'s flags) compared byte for byte with golden
 * files made by the code before the issue-11 reshaping, so moving code around
 * cannot change any output. run.json is compared with the parts that vary
 * between runs (clock, versions, timings, folders) taken out; report.html with
 * its creation time blanked. To remake the golden files after an intended
 * change: `SHEAF_GOLDEN_WRITE=1 npx vitest run test/golden-demo.test.ts`
 * (see test/fixtures/golden/README.md).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { sheaf, tempDir } from './helpers/cli.js';

const root = path.resolve(__dirname, '..');
const golden = path.join(root, 'test', 'fixtures', 'golden');
const write = process.env.SHEAF_GOLDEN_WRITE === '1';

/** The demo script's flags (package.json "demo"), with the input relative to the working folder. */
export const DEMO_ARGS = ['group', 'corpus-demo/tickets.csv', '--text', 'subject,body', '--id', 'ticket_id', '--title', 'subject', '--groups', '8', '--truth', 'category'];

const EXACT = ['documents.csv', 'groups.json', 'model.json', 'duplicates.csv', 'duplicates.json', 'tree.nwk'];

/** run.json without what differs from run to run: clock, versions, timings, absolute folders. */
export function stableRunJson(text: string): string {
  const r = JSON.parse(text) as Record<string, unknown>;
  delete r.startedAt;
  delete r.finishedAt;
  delete r.versions;
  delete r.cwd;
  r.timings = (r.timings as { stage: string }[]).map((t) => t.stage);
  const settings = r.settings as Record<string, unknown>;
  delete settings.out;
  delete settings.threads;
  // The default memory limit is a share of the machine's memory.
  delete ((settings.grouping as Record<string, unknown>).tree as Record<string, unknown>).memoryLimitBytes;
  return JSON.stringify(r, null, 2) + '\n';
}

/** report.html with its creation time blanked. */
function stableReport(text: string): string {
  return text.replace(/\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d(\.\d+)?Z/g, 'TIME');
}

describe('the demo run is byte-identical to the golden outputs', () => {
  let out: string;
  beforeAll(async () => {
    out = path.join(tempDir(), 'demo-out');
    const run = await sheaf([...DEMO_ARGS, '--out', out], { cwd: root });
    if (write) writeFileSync(path.join(golden, 'stderr.txt'), run.stderr);
    expect(run.stderr).toBe(readFileSync(path.join(golden, 'stderr.txt'), 'utf8'));
    expect(run.code).toBe(0);
    if (write) {
      mkdirSync(golden, { recursive: true });
      for (const f of EXACT) writeFileSync(path.join(golden, f), readFileSync(path.join(out, f)));
      writeFileSync(path.join(golden, 'run.json'), stableRunJson(readFileSync(path.join(out, 'run.json'), 'utf8')));
      writeFileSync(path.join(golden, 'report.html'), stableReport(readFileSync(path.join(out, 'report.html'), 'utf8')));
      writeFileSync(path.join(golden, 'stdout.txt'), run.stdout.split(out).join('OUT'));
    }
    expect(run.stdout.split(out).join('OUT')).toBe(readFileSync(path.join(golden, 'stdout.txt'), 'utf8'));
  }, 120_000);

  for (const f of EXACT) {
    it(`${f} is byte-identical`, () => {
      expect(existsSync(path.join(golden, f))).toBe(true);
      expect(readFileSync(path.join(out, f)).equals(readFileSync(path.join(golden, f)))).toBe(true);
    });
  }

  it('run.json is identical apart from clock, versions, timings and folders', () => {
    expect(stableRunJson(readFileSync(path.join(out, 'run.json'), 'utf8'))).toBe(readFileSync(path.join(golden, 'run.json'), 'utf8'));
  });

  it('report.html is identical apart from its creation time', () => {
    expect(stableReport(readFileSync(path.join(out, 'report.html'), 'utf8'))).toBe(readFileSync(path.join(golden, 'report.html'), 'utf8'));
  });
});
