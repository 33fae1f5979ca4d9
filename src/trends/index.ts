/**
 * Themes over time: counts of documents per group per period (day, ISO-8601
 * week or month), from date values given as text. Pure: no clock, no time
 * zone of the machine; every computation is in UTC.
 *
 * - Accepted values: `YYYY-MM-DD`, or a date and time `YYYY-MM-DD[T ]HH:MM[:SS[.fff]]`
 *   with an optional `Z` or `±HH:MM`/`±HHMM` offset (ISO 8601 / RFC 3339 forms).
 *   A time without an offset is read as UTC; one with an offset is converted to UTC.
 *   Anything else (or an impossible date such as 2029-02-30) is unparsed.
 * - Granularity from the span between the first and the last date (our rule):
 *   up to 62 days → days, up to 731 days → ISO-8601 weeks (Monday first, week 1
 *   holds the year's first Thursday), longer → months.
 * - Every period between the first and the last is listed, empty ones with 0.
 * - Rising groups: those whose count grew most from the next-to-last period to
 *   the last (at most {@link RISING_MAX}, growth > 0, largest first).
 *
 * @module
 */

/** Most groups flagged as rising. */
export const RISING_MAX = 3;

/** Period length. */
export type Granularity = 'day' | 'week' | 'month';

/** Counts per group per period. */
export interface GroupTrends {
  readonly granularity: Granularity;
  /** Period keys, oldest first: `2029-03-17`, `2029-W11`, `2029-03`. */
  readonly periods: readonly string[];
  /** `counts[g * periods.length + p]`: documents of group g dated in period p. */
  readonly counts: Int32Array;
  /** Period index of each document (-1 when its date was not read or it is in no group... see `unparsed`). */
  readonly periodOf: Int32Array;
  /** Documents whose date could not be read, in the order given. */
  readonly unparsed: Int32Array;
  /** Groups that grew most in the last period, largest growth first. */
  readonly rising: Int32Array;
}

const DAY_MS = 86_400_000;
const DATE_TIME =
  /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,9}))?)?\s*(Z|z|[+-]\d{2}:?\d{2})?)?$/;

/** Milliseconds since 1970-01-01T00:00Z of an accepted date value, or NaN (see the module note). */
export function parseDateValue(value: string): number {
  const m = DATE_TIME.exec(value.trim());
  if (!m) return Number.NaN;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const [h, mi, s] = [Number(m[4] ?? 0), Number(m[5] ?? 0), Number(m[6] ?? 0)];
  if (mo < 1 || mo > 12 || d < 1 || h > 23 || mi > 59 || s > 59) return Number.NaN;
  const day = Date.UTC(y, mo - 1, d);
  if (new Date(day).getUTCDate() !== d) return Number.NaN;
  const ms = m[7] ? Math.floor(Number(`0.${m[7]}`) * 1000) : 0;
  let offset = 0;
  const z = m[8];
  if (z && z !== 'Z' && z !== 'z') {
    const sign = z[0] === '-' ? -1 : 1;
    const digits = z.slice(1).replace(':', '');
    const oh = Number(digits.slice(0, 2));
    const om = Number(digits.slice(2, 4));
    if (oh > 23 || om > 59) return Number.NaN;
    offset = sign * (oh * 60 + om) * 60_000;
  }
  return day + ((h * 60 + mi) * 60 + s) * 1000 + ms - offset;
}

/** True when the value carries an explicit offset or `Z`. */
export function hasOffset(value: string): boolean {
  const m = DATE_TIME.exec(value.trim());
  return m !== null && m[8] !== undefined;
}

/** Granularity for a span from `first` to `last` (ms, UTC). */
export function granularityFor(first: number, last: number): Granularity {
  const days = (last - first) / DAY_MS;
  return days <= 62 ? 'day' : days <= 731 ? 'week' : 'month';
}

function pad(n: number, w = 2): string {
  return String(n).padStart(w, '0');
}

/** ISO-8601 week of a UTC instant: `[weekYear, week]`. */
export function isoWeek(ms: number): [number, number] {
  const d = new Date(Math.floor(ms / DAY_MS) * DAY_MS);
  const weekday = (d.getUTCDay() + 6) % 7; // Monday 0
  const thursday = d.getTime() + (3 - weekday) * DAY_MS;
  const year = new Date(thursday).getUTCFullYear();
  const week = 1 + Math.floor((thursday - Date.UTC(year, 0, 1)) / (7 * DAY_MS));
  return [year, week];
}

/** Start (ms, UTC) of the period holding `ms`. */
function periodStart(ms: number, g: Granularity): number {
  const day = Math.floor(ms / DAY_MS) * DAY_MS;
  if (g === 'day') return day;
  if (g === 'week') return day - ((new Date(day).getUTCDay() + 6) % 7) * DAY_MS;
  const d = new Date(day);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1);
}

/** Key of the period starting at `start`. */
export function periodKey(start: number, g: Granularity): string {
  const d = new Date(start);
  if (g === 'day') return `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}`;
  if (g === 'month') return `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}`;
  const [y, w] = isoWeek(start);
  return `${y}-W${pad(w)}`;
}

function nextStart(start: number, g: Granularity): number {
  if (g === 'day') return start + DAY_MS;
  if (g === 'week') return start + 7 * DAY_MS;
  const d = new Date(start);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1);
}

/**
 * Counts per group per period. `dates[i]` is document i's date value (empty
 * or unreadable: unparsed), `groups[i]` its group (-1: in no group, dated but
 * not counted). `granularity` forces a period length; default from the span.
 */
export function groupTrends(dates: readonly string[], groups: Int32Array, groupCount: number, granularity?: Granularity): GroupTrends {
  const n = dates.length;
  if (groups.length !== n) throw new RangeError(`${n} dates but ${groups.length} groups`);
  const times = new Float64Array(n);
  const unparsed: number[] = [];
  let first = Infinity;
  let last = -Infinity;
  for (let i = 0; i < n; i++) {
    const t = parseDateValue(dates[i]!);
    times[i] = t;
    if (Number.isNaN(t)) unparsed.push(i);
    else {
      if (t < first) first = t;
      if (t > last) last = t;
    }
  }
  const periodOf = new Int32Array(n).fill(-1);
  if (first === Infinity) {
    return { granularity: granularity ?? 'day', periods: [], counts: new Int32Array(0), periodOf, unparsed: Int32Array.from(unparsed), rising: new Int32Array(0) };
  }
  const g = granularity ?? granularityFor(first, last);
  const starts: number[] = [];
  const index = new Map<number, number>();
  for (let s = periodStart(first, g); s <= last; s = nextStart(s, g)) {
    index.set(s, starts.length);
    starts.push(s);
  }
  const p = starts.length;
  const counts = new Int32Array(groupCount * p);
  for (let i = 0; i < n; i++) {
    if (Number.isNaN(times[i]!)) continue;
    const at = index.get(periodStart(times[i]!, g))!;
    periodOf[i] = at;
    const grp = groups[i]!;
    if (grp >= 0 && grp < groupCount) counts[grp * p + at]++;
  }
  const growth: [number, number][] = [];
  if (p >= 2) {
    for (let k = 0; k < groupCount; k++) {
      const d = counts[k * p + p - 1]! - counts[k * p + p - 2]!;
      if (d > 0) growth.push([k, d]);
    }
  }
  growth.sort((a, b) => b[1] - a[1] || a[0] - b[0]);
  return {
    granularity: g,
    periods: starts.map((s) => periodKey(s, g)),
    counts,
    periodOf,
    unparsed: Int32Array.from(unparsed),
    rising: Int32Array.from(growth.slice(0, RISING_MAX).map((x) => x[0])),
  };
}

/** `trends.csv` rows: `group, period, count` for every group and period (zeros included). */
export function trendRows(t: GroupTrends, groupCount: number): string[][] {
  const rows: string[][] = [];
  const p = t.periods.length;
  for (let g = 0; g < groupCount; g++) for (let k = 0; k < p; k++) rows.push([String(g), t.periods[k]!, String(t.counts[g * p + k])]);
  return rows;
}
