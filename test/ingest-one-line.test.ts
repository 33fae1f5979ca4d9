/** The one-line skip reason the PDF, DOCX and workbook readers give for a library's error. */
import { describe, expect, it } from 'vitest';
import { oneLine } from '../src/ingest/io-errors.js';

describe('oneLine', () => {
  it('keeps the first line of the message, folds white space and drops a final full stop', () => {
    expect(oneLine(new Error('Invalid   XRef stream.\n    at parse (pdf.js:1)'))).toBe('Invalid XRef stream');
    expect(oneLine('end of central directory\tnot found.')).toBe('end of central directory not found');
    expect(oneLine(new Error('  \n second line'))).toBe('unknown error');
    expect(oneLine(undefined)).toBe('undefined');
  });
});
