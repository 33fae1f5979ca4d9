/** Every command that reads documents lists, in its help, every format the ingest edge reads. */
import { describe, expect, it } from 'vitest';
import { sheaf } from './helpers/cli.js';

const FORMATS = ['.txt', '.md', '.html', '.pdf', '.docx', '.eml', '.mbox', '.csv', '.tsv', '.jsonl', '.json', '.xlsx', '.bib', '.ris', 'CSL JSON', '.xls'];

describe('help lists the readable formats', () => {
  for (const command of ['group', 'tree', 'duplicates', 'assign']) {
    it(`${command} --help names ${FORMATS.join(' ')}`, async () => {
      const r = await sheaf([command, '--help']);
      const text = r.stdout + r.stderr;
      expect(text).toContain('Inputs read (by extension; a file with another extension by its content):');
      for (const f of FORMATS) expect(text, f).toContain(f);
      expect(text).toContain('--sheet <name>');
    });
  }
});
