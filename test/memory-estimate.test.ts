/**
 * The `--memory` estimate against peaks measured on this kind of machine
 * (the measurements and the commands that took them are in src/cli/memory.ts).
 */
import { describe, expect, it } from 'vitest';
import { estimatePeak } from '../src/cli/memory.js';

/** Measured with /usr/bin/time -v (maximum resident set size, KiB) on bench/generate.mjs tickets, seed 7. */
const MEASURED = [
  { rows: '63k', bytes: 24_999_783, report: false, peakKiB: 432_224 },
  { rows: '63k', bytes: 24_999_783, report: true, peakKiB: 524_536 },
  { rows: '318k', bytes: 126_674_740, report: false, peakKiB: 1_163_952 },
  // After ASCII input became one-byte strings (k = 100; the 1M run with --cpu-prof): see src/cli/memory.ts.
  { rows: '60k', bytes: 23_810_967, report: false, peakKiB: 541_604 },
  { rows: '1M', bytes: 398_337_588, report: false, peakKiB: 2_635_888 },
];

describe('estimatePeak', () => {
  for (const m of MEASURED) {
    it(`is within 25% of the measured peak at ${m.rows} rows (report ${m.report ? 'on' : 'off'})`, () => {
      const peak = m.peakKiB * 1024;
      const ratio = estimatePeak(m.bytes) / peak;
      expect(ratio).toBeGreaterThanOrEqual(0.75);
      expect(ratio).toBeLessThanOrEqual(1.25);
    });
  }

  it('gives these figures for the measured inputs (256 MiB + 7 bytes per input byte)', () => {
    expect(Math.round(estimatePeak(24_999_783) / 1e6)).toBe(443);
    expect(Math.round(estimatePeak(126_674_740) / 1e6)).toBe(1155);
    expect(Math.round(estimatePeak(398_337_588) / 1e6)).toBe(3057);
  });
});
