/**
 * Turning flag strings into typed option values, with one-line messages that
 * name the flag, the bad value and what is allowed.
 *
 * @module
 */
import { UsageError, show } from '../util/errors.js';
import { flagFor } from './flag-names.js';

/** A whole number flag, or undefined when not given. */
export function wholeNumber(value: string | undefined, option: string): number | undefined {
  if (value === undefined) return undefined;
  if (!/^\s*[+-]?\d+\s*$/.test(value)) {
    throw new UsageError(`${option} must be a whole number; got ${show(value)}`, option);
  }
  return Number(value);
}

/** A number flag (whole or fractional), or undefined when not given. */
export function decimal(value: string | undefined, option: string): number | undefined {
  if (value === undefined) return undefined;
  const v = value.trim();
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(v)) {
    throw new UsageError(`${option} must be a number; got ${show(value)}`, option);
  }
  return Number(v);
}

/** A comma-separated list flag; empty items dropped. */
export function list(value: string | undefined): string[] | undefined {
  if (value === undefined) return undefined;
  return value
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s.length > 0);
}

/** Repeatable flag collector for commander. */
export function collect(value: string, previous: string[] = []): string[] {
  return [...previous, value];
}

/**
 * The one line shown for a usage error, with library option names in their
 * flag spelling for `command` (one table, `flag-names.ts`): the error's own
 * option when the message starts with it (`groups must be …` → `--groups must
 * be …`; `sampleSize must be …` → `--sample must be …`), and any multi-word name from `known` wherever it stands as a whole
 * word (`lower minDf` → `lower --min-df`).
 */
export function usageLine(err: UsageError, known: readonly string[] = [], command?: string): string {
  let line = err.message;
  if (err.option && line.startsWith(err.option + ' ')) line = flagFor(err.option, command) + line.slice(err.option.length);
  for (const name of new Set([...known, ...(err.option ? [err.option] : [])])) {
    if (!/^[a-z]+[A-Z][A-Za-z]*$/.test(name)) continue;
    line = line.replace(new RegExp(`(^|[\\s(;,])${name}(?=[\\s:;,)]|$)`, 'g'), `$1${flagFor(name, command)}`);
  }
  return line;
}
