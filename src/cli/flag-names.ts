/**
 * The one table from library option names to flag spellings. A name not in
 * the table is its flag in kebab case (`minDf` → `--min-df`); the table lists
 * the names whose flag differs, for every command or for one.
 *
 * @module
 */

/** Library name → flag, where the flag is not the kebab-case name. `'*'` holds what applies to every command. */
export const FLAG_NAMES: Readonly<Record<string, Readonly<Record<string, string>>>> = Object.freeze({
  '*': Object.freeze({ sampleSize: '--sample', dims: '--reduce' }),
  // `sheaf group --duplicates t`: the threshold of the near-copy search a grouping run adds.
  group: Object.freeze({ threshold: '--duplicates' }),
});

/** `minDf` → `--min-df`. */
export function kebabFlag(option: string): string {
  return '--' + option.replace(/[A-Z]/g, (c) => '-' + c.toLowerCase());
}

/** The flag that sets library option `option` in `command` (or in any command). */
export function flagFor(option: string, command?: string): string {
  return (command !== undefined ? FLAG_NAMES[command]?.[option] : undefined) ?? FLAG_NAMES['*']![option] ?? kebabFlag(option);
}
