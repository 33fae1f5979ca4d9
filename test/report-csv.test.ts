import { describe, expect, it } from 'vitest';
import { csvRecord, csvText, guardCell, quoteCell } from '../src/report/csv.js';
import { renderTable, clip, cellWidth } from '../src/cli/table.js';

describe('CSV cells', () => {
  it('quotes per RFC 4180 §2 (rules 6 and 7: fields with comma, quote or line break are quoted; quotes doubled)', () => {
    expect(quoteCell('plain')).toBe('plain');
    expect(quoteCell('a,b')).toBe('"a,b"');
    expect(quoteCell('say "hi"')).toBe('"say ""hi"""');
    expect(quoteCell('two\r\nlines')).toBe('"two\r\nlines"');
    expect(csvText(['x', 'y'], [['1', 'a,b']])).toBe('x,y\r\n1,"a,b"\r\n');
  });

  it('guards cells a spreadsheet would run as formulas (OWASP, "CSV Injection")', () => {
    // The OWASP page lists =, +, -, @, tab (0x09) and carriage return (0x0D) as dangerous leading characters.
    expect(guardCell('=1+2')).toBe("'=1+2");
    expect(guardCell('+1+2')).toBe("'+1+2");
    expect(guardCell('-2+3')).toBe("'-2+3");
    expect(guardCell('@SUM(A1:A2)')).toBe("'@SUM(A1:A2)");
    expect(guardCell('\t=1')).toBe("'\t=1");
    expect(guardCell('\r=1')).toBe("'\r=1");
    expect(csvRecord(['=HYPERLINK("http://x.example","a")'])).toBe(`"'=HYPERLINK(""http://x.example"",""a"")"`);
    // Plain numbers stay numbers.
    expect(guardCell('-0.25')).toBe('-0.25');
    expect(guardCell('+3')).toBe('+3');
    expect(guardCell('a=b')).toBe('a=b');
  });
});

describe('terminal tables', () => {
  it('fits the width and cuts long cells with an ellipsis', () => {
    const lines = renderTable(
      [{ heading: 'id', align: 'right' }, { heading: 'name', min: 6 }],
      [['1', 'a very long name that will not fit'], ['22', 'short']],
      20,
    );
    expect(lines).toEqual(['id  name', '──  ────────────────', ' 1  a very long nam…', '22  short']);
    for (const l of lines) expect(cellWidth(l)).toBeLessThanOrEqual(20);
  });

  it('counts wide characters as two cells', () => {
    expect(cellWidth('漢字ab')).toBe(6);
    expect(clip('漢字漢字', 5)).toBe('漢字…');
  });
});

describe('CSV in pieces', () => {
  it('gives the same text as one string, however it is cut', async () => {
    const { csvChunks } = await import('../src/report/csv.js');
    const rows = Array.from({ length: 25 }, (_, i) => [String(i), i % 3 ? 'plain' : 'a,"b"\n=c']);
    const whole = csvText(['id', 'text'], rows);
    for (const per of [1, 2, 7, 25, 100]) {
      const pieces = [...csvChunks(['id', 'text'], rows, per)];
      expect(pieces.join('')).toBe(whole);
      // 26 records (header + 25 rows); a piece is cut once it holds `per` records, the header never alone.
      expect(pieces.length).toBe(per === 1 ? 25 : Math.ceil(26 / per));
    }
  });
});
