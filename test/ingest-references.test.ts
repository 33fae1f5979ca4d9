/**
 * Reference lists read as row exports. The samples are written here from the
 * published format descriptions (content invented, syntax as described;
 * sections cited from memory beside each sample).
 */
import { describe, expect, it } from 'vitest';
import { ingest } from '../src/ingest/index.js';
import { bibtexNames, bibtexText, parseBibtex, parseRis } from '../src/ingest/references.js';
import { put, tmp, usage } from './helpers/files.js';

// BibTeX: Lamport, LaTeX: A Document Preparation System (2nd ed.), App. B.1.1 (an entry: @TYPE{key, field = text,
// ...}, braces or parentheses around it), B.1.2 (field text in braces or double quotes, a bare number, accents as
// {\"u}), B.1.3 (@string abbreviations, # concatenation, the month abbreviations jan…dec); names joined with "and"
// (App. B.1.2 and btxdoc §4, "Names"); @comment and @preamble (btxdoc §2).
const BIB = String.raw`
Text outside entries is a comment.
@string{ jqh = "Journal of Quiet Harbours" }
@comment{ not a reference }
@preamble{ "\newcommand{\noop}[1]{}" }
@ARTICLE{ortega2025,
  author   = {Ana Ortega and Brandt, Ben and {Lighthouse Keepers' Guild}},
  title    = "Boiler noise in {M}{\"u}nchen and {\AA}lesund",
  journal  = jqh,
  year     = 2025,
  month    = jul,
  keywords = {boilers, noise; night},
  abstract = {Boilers hum at night---mostly between 2~and 4 a.m.},
  doi      = {10.1234/jqh.2025.7}
}
@inproceedings(keeper2024,
  author    = "Dora Keeper",
  title     = {Logbooks} # { of } # "lighthouses",
  booktitle = {Proceedings of the Harbour Days},
  year      = {2024}
)
@misc{broken2023,
  title = {a brace that never closes,
}
`;

// RIS: the RIS format specification (Research Information Systems): "XY  - value" lines, TY opens a reference, ER
// closes it; AU and KW repeat; PY is YYYY/MM/DD/other; T2 the journal, AB the abstract, DO the DOI, ID the reference id.
const RIS = [
  'TY  - JOUR',
  'ID  - ortega2025',
  'AU  - Ortega, Ana',
  'AU  - Brandt, Ben',
  'TI  - Boiler noise at night',
  'T2  - Journal of Quiet Harbours',
  'PY  - 2025/07//',
  'KW  - boilers',
  'KW  - noise',
  'AB  - Boilers hum at night,',
  'mostly between two and four.',
  'DO  - 10.1234/jqh.2025.7',
  'ER  - ',
  '',
  'TY  - BOOK',
  'A1  - Keeper, Dora',
  'T1  - Lighthouse logbooks',
  'Y1  - 2024',
  'ER  - ',
].join('\r\n');

// CSL-JSON: the CSL data schema (csl-data.json): an array of items with id, type, title, author (family/given or
// literal), issued (date-parts, or raw), container-title, DOI, abstract, keyword (one string).
const CSL = [
  {
    id: 'ortega2025',
    type: 'article-journal',
    title: 'Boiler noise at night',
    author: [{ family: 'Ortega', given: 'Ana' }, { literal: "Lighthouse Keepers' Guild" }],
    issued: { 'date-parts': [[2025, 7]] },
    'container-title': 'Journal of Quiet Harbours',
    DOI: '10.1234/jqh.2025.7',
    abstract: 'Boilers hum at night.',
    keyword: 'boilers, noise',
  },
  { id: 7, type: 'book', title: 'Lighthouse logbooks', issued: { raw: 'spring 2024' } },
];

describe('BibTeX', () => {
  it('reads entries as rows: key, type, title, authors, year, container, doi, abstract, keywords; text = title + abstract + keywords', async () => {
    const dir = tmp();
    put(dir, 'refs.bib', BIB);
    const r = await ingest(['refs.bib'], {}, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.title])).toEqual([
      ['ortega2025', 'Boiler noise in München and Ålesund'],
      ['keeper2024', 'Logbooks of lighthouses'],
    ]);
    expect(r.docs[0]?.text).toBe('Boiler noise in München and Ålesund\n\nBoilers hum at night—mostly between 2 and 4 a.m.\n\nboilers; noise; night');
    expect(Object.fromEntries(r.docs[0]?.fields ?? [])).toEqual({
      type: 'article',
      title: 'Boiler noise in München and Ålesund',
      authors: "Ana Ortega; Brandt, Ben; Lighthouse Keepers' Guild",
      year: '2025',
      container: 'Journal of Quiet Harbours',
      doi: '10.1234/jqh.2025.7',
      abstract: 'Boilers hum at night—mostly between 2 and 4 a.m.',
      keywords: 'boilers; noise; night',
    });
    expect(r.docs[1]?.fields.get('container')).toBe('Proceedings of the Harbour Days');
    expect(r.docs[1]?.text).toBe('Logbooks of lighthouses');
    expect([...r.exportRows]).toEqual([1, 1]);
    expect(r.warnings).toEqual(['refs.bib: the @misc entry on line 22 cannot be read (the entry never closes); left out']);
  });

  it('takes --text, --id and --title among its columns, and names them when one is missing', async () => {
    const dir = tmp();
    put(dir, 'refs.bib', BIB);
    const r = await ingest(['refs.bib'], { text: ['abstract'], title: 'container', id: 'doi' }, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.title, d.text])).toEqual([
      ['10.1234/jqh.2025.7', 'Journal of Quiet Harbours', 'Boilers hum at night—mostly between 2 and 4 a.m.'],
      ['2', 'Proceedings of the Harbour Days', ''],
    ]);
    const e = await usage(ingest(['refs.bib'], { text: ['journal'] }, { cwd: dir }));
    expect(e.message).toBe('refs.bib has no column "journal" for --text; its columns are: key, type, title, authors, year, container, doi, abstract, keywords');
  });

  it('plain text of field values and names', () => {
    expect(bibtexText(String.raw`{\'E}cole {\c c}a {\ss} \o{} na{\"\i}ve \& 50\%`)).toBe('École ça ß ø naïve & 50%');
    expect(bibtexNames('{Barnes and Noble, Inc.} and Knuth, Donald E.')).toBe('Barnes and Noble, Inc.; Knuth, Donald E.');
    expect(parseBibtex('@article{k, title = "A", year = 1999 }').refs[0]?.year).toBe('1999');
  });
});

describe('RIS', () => {
  it('reads TY…ER references with repeated AU and KW, continued lines, and the year from PY or Y1', async () => {
    const dir = tmp();
    put(dir, 'refs.ris', RIS);
    const r = await ingest(['refs.ris'], {}, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.title, d.text])).toEqual([
      ['ortega2025', 'Boiler noise at night', 'Boiler noise at night\n\nBoilers hum at night, mostly between two and four.\n\nboilers; noise'],
      ['2', 'Lighthouse logbooks', 'Lighthouse logbooks'],
    ]);
    expect(r.docs.map((d) => [d.fields.get('type'), d.fields.get('authors'), d.fields.get('year'), d.fields.get('container'), d.fields.get('doi')])).toEqual([
      ['JOUR', 'Ortega, Ana; Brandt, Ben', '2025', 'Journal of Quiet Harbours', '10.1234/jqh.2025.7'],
      ['BOOK', 'Keeper, Dora', '2024', '', ''],
    ]);
    expect(r.warnings).toEqual(['refs.ris: 1 row(s) have an empty id; their row numbers are used instead (rows 2)']);
  });

  it('notes a reference without ER and tags outside a reference', () => {
    const p = parseRis('AU  - Stray, Line\nTY  - GEN\nTI  - One\nTY  - GEN\nTI  - Two\n');
    expect(p.refs.map((x) => x.title)).toEqual(['One', 'Two']);
    expect(p.problems).toEqual([
      'line 1 (AU) is outside a reference (no TY before it); left out',
      'the reference opened on line 2 has no ER line before the next TY',
      'the reference opened on line 4 has no ER line at the end',
    ]);
  });
});

describe('CSL-JSON', () => {
  it('reads a CSL item list as references (names family, given or literal; year from date-parts or raw)', async () => {
    const dir = tmp();
    put(dir, 'library.json', JSON.stringify(CSL));
    const r = await ingest(['library.json'], {}, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.title, d.text])).toEqual([
      ['ortega2025', 'Boiler noise at night', 'Boiler noise at night\n\nBoilers hum at night.\n\nboilers; noise'],
      ['7', 'Lighthouse logbooks', 'Lighthouse logbooks'],
    ]);
    expect(r.docs.map((d) => [d.fields.get('authors'), d.fields.get('year'), d.fields.get('container'), d.fields.get('doi')])).toEqual([
      ["Ortega, Ana; Lighthouse Keepers' Guild", '2025', 'Journal of Quiet Harbours', '10.1234/jqh.2025.7'],
      ['', '2024', '', ''],
    ]);
    expect(r.warnings).toEqual([]);
  });

  it('leaves a JSON array that is not CSL as an ordinary export', async () => {
    const dir = tmp();
    put(dir, 'rows.json', JSON.stringify([{ id: 1, type: 'note', body: 'plain row' }]));
    const r = await ingest(['rows.json'], {}, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.text, [...d.fields.keys()]])).toEqual([['1', 'plain row', ['id', 'type', 'body']]]);
  });
});
