/**
 * Counts per group per period (src/trends): date reading, ISO-8601 weeks
 * against Python's datetime.isocalendar (fixture made by
 * test/fixtures/trends/make_iso_weeks.py), granularity and rising groups.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { granularityFor, groupTrends, isoWeek, parseDateValue, trendRows } from '../src/trends/index.js';

const weeks = JSON.parse(readFileSync(path.join(__dirname, 'fixtures', 'trends', 'iso-weeks.json'), 'utf8')) as [string, number, number][];

describe('dates', () => {
  it('reads dates and times as UTC unless they carry an offset', () => {
    expect(parseDateValue('2029-03-17')).toBe(Date.UTC(2029, 2, 17));
    expect(parseDateValue('2029-03-17T18:23:00Z')).toBe(Date.UTC(2029, 2, 17, 18, 23));
    expect(parseDateValue('2029-03-17 18:23')).toBe(Date.UTC(2029, 2, 17, 18, 23));
    // 01:30 at +02:00 is 23:30 UTC the day before.
    expect(parseDateValue('2029-03-17T01:30:00+02:00')).toBe(Date.UTC(2029, 2, 16, 23, 30));
    expect(parseDateValue('2029-03-17T01:30:00.250-0130')).toBe(Date.UTC(2029, 2, 17, 3, 0, 0, 250));
  });

  it('leaves impossible and foreign values unread', () => {
    for (const v of ['', '2029-02-30', '2029-13-01', '17/03/2029', 'yesterday', '2029-03-17T25:00', '<script>']) expect(parseDateValue(v)).toBeNaN();
  });

  it('ISO-8601 weeks match Python datetime.isocalendar on 600 dates', () => {
    expect(weeks.length).toBeGreaterThan(550);
    for (const [date, y, w] of weeks) expect([date, ...isoWeek(parseDateValue(date))]).toEqual([date, y, w]);
  });

  it('granularity from the span: 62 days → days, 731 → weeks, longer → months', () => {
    const d = (s: string) => parseDateValue(s);
    expect(granularityFor(d('2029-01-01'), d('2029-03-04'))).toBe('day');
    expect(granularityFor(d('2029-01-01'), d('2029-03-05'))).toBe('week');
    expect(granularityFor(d('2029-01-01'), d('2031-01-02'))).toBe('week');
    expect(granularityFor(d('2029-01-01'), d('2031-01-03'))).toBe('month');
  });
});

describe('groupTrends', () => {
  it('counts per group per week, empty weeks listed, unparsed kept, rising flagged', () => {
    // 2029-01-01 is a Monday (ISO 2029-W01).
    const dates = ['2029-01-01', '2029-01-03', '2029-01-09', 'n/a', '2029-01-22T10:00Z', '2029-01-23', '2029-01-24', '2029-03-10', '2029-03-11'];
    const groups = Int32Array.from([0, 1, 0, 1, 1, 1, 0, 1, -1]);
    const t = groupTrends(dates, groups, 2);
    expect(t.granularity).toBe('week');
    expect(t.periods).toEqual(['2029-W01', '2029-W02', '2029-W03', '2029-W04', '2029-W05', '2029-W06', '2029-W07', '2029-W08', '2029-W09', '2029-W10']);
    const row = (g: number) => Array.from(t.counts.subarray(g * 10, g * 10 + 10));
    expect(row(0)).toEqual([1, 1, 0, 1, 0, 0, 0, 0, 0, 0]);
    expect(row(1)).toEqual([1, 0, 0, 2, 0, 0, 0, 0, 0, 1]);
    expect(Array.from(t.unparsed)).toEqual([3]);
    expect(Array.from(t.rising)).toEqual([1]);
    expect(t.periodOf[8]).toBe(9);
    expect(trendRows(t, 2)[0]).toEqual(['0', '2029-W01', '1']);
    expect(trendRows(t, 2)).toHaveLength(20);
  });

  it('a week that starts in one year and ends in the next has one key (2029-12-31 is 2030-W01)', () => {
    const t = groupTrends(['2029-12-31', '2030-01-06'], Int32Array.from([0, 0]), 1, 'week');
    expect(t.periods).toEqual(['2030-W01']);
    expect(Array.from(t.counts)).toEqual([2]);
  });

  it('no readable date: no periods, every document unparsed', () => {
    const t = groupTrends(['x', ''], Int32Array.from([0, 0]), 1);
    expect(t.periods).toEqual([]);
    expect(Array.from(t.unparsed)).toEqual([0, 1]);
  });
});
