/**
 * Options of the cleaning stage: defaults, and the one place they are
 * merged and validated.
 *
 * @module
 */
import { UsageError, show } from '../util/errors.js';

/** `tickets`: strip reply history, signatures, greetings, boilerplate and fold identifiers; `none`: leave texts as they are. */
export type CleanMode = 'tickets' | 'none';

/** The modes accepted by {@link CleanOptions.mode}, in the order the error message lists them. */
export const CLEAN_MODES: readonly CleanMode[] = Object.freeze(['tickets', 'none']);

/** What cleaning does; every rule but `mode` applies in `tickets` mode only. */
export interface CleanOptions {
  /** `tickets` or `none`. */
  readonly mode: CleanMode;
  /** Drop quoted lines (`>`), reply headers ("On … wrote:" and their equivalents) and the history under them. */
  readonly quotes: boolean;
  /** Drop signatures: from a `-- ` line on (RFC 3676 §4.3), a sign-off with a short name block, "sent from my phone" lines. */
  readonly signatures: boolean;
  /** Drop a greeting line at the start ("Hi team,", "Hello,", "Dear …,"). */
  readonly greetings: boolean;
  /** Drop lines repeated across many documents (see `boilerplateShare` and `boilerplateMinDocs`). */
  readonly boilerplate: boolean;
  /** A line is boilerplate when found in at least this share of the documents, a fraction in (0, 1]… */
  readonly boilerplateShare: number;
  /** …and in at least this many documents (a whole number >= 2). */
  readonly boilerplateMinDocs: number;
  /** Replace URLs, e-mail addresses, ticket/order ids and long numbers by placeholder words. */
  readonly placeholders: boolean;
}

/** Defaults: the `tickets` mode with every rule on; boilerplate = a line in >= 20% of the documents and >= 5 of them. */
export const DEFAULT_CLEAN_OPTIONS: CleanOptions = Object.freeze({
  mode: 'tickets',
  quotes: true,
  signatures: true,
  greetings: true,
  boilerplate: true,
  boilerplateShare: 0.2,
  boilerplateMinDocs: 5,
  placeholders: true,
});

const KEYS: ReadonlySet<string> = new Set(Object.keys(DEFAULT_CLEAN_OPTIONS));

/**
 * Merges `partial` over {@link DEFAULT_CLEAN_OPTIONS} (an `undefined` value
 * means "default") and validates once. Throws {@link UsageError} naming the
 * option, the bad value and what is allowed:
 *
 * - `mode`: one of {@link CLEAN_MODES};
 * - `quotes`, `signatures`, `greetings`, `boilerplate`, `placeholders`: booleans;
 * - `boilerplateShare`: a fraction in (0, 1];
 * - `boilerplateMinDocs`: a whole number >= 2;
 * - no other keys.
 */
export function resolveCleanOptions(partial: Partial<CleanOptions> = {}): CleanOptions {
  if (partial === null || typeof partial !== 'object' || Array.isArray(partial)) {
    throw new UsageError(`clean options must be an object; got ${show(partial)}`);
  }
  for (const key of Object.keys(partial)) {
    if (!KEYS.has(key)) throw new UsageError(`unknown clean option ${show(key)}; allowed: ${[...KEYS].join(', ')}`, key);
  }
  const d = DEFAULT_CLEAN_OPTIONS;
  const pick = <K extends keyof CleanOptions>(k: K): unknown => (partial[k] === undefined ? d[k] : partial[k]);
  const mode = pick('mode');
  if (typeof mode !== 'string' || !(CLEAN_MODES as readonly string[]).includes(mode)) {
    throw new UsageError(`clean mode must be one of ${CLEAN_MODES.join(', ')}; got ${show(mode)}`, 'mode');
  }
  const flag = (k: 'quotes' | 'signatures' | 'greetings' | 'boilerplate' | 'placeholders'): boolean => {
    const v = pick(k);
    if (typeof v !== 'boolean') throw new UsageError(`${k} must be true or false; got ${show(v)}`, k);
    return v;
  };
  const share = pick('boilerplateShare');
  if (typeof share !== 'number' || !Number.isFinite(share) || share <= 0 || share > 1) {
    throw new UsageError(`boilerplateShare must be a fraction in (0, 1] of the documents; got ${show(share)}`, 'boilerplateShare');
  }
  const minDocs = pick('boilerplateMinDocs');
  if (typeof minDocs !== 'number' || !Number.isSafeInteger(minDocs) || minDocs < 2) {
    throw new UsageError(`boilerplateMinDocs must be a whole number >= 2; got ${show(minDocs)}`, 'boilerplateMinDocs');
  }
  return Object.freeze({
    mode: mode as CleanMode,
    quotes: flag('quotes'),
    signatures: flag('signatures'),
    greetings: flag('greetings'),
    boilerplate: flag('boilerplate'),
    boilerplateShare: share,
    boilerplateMinDocs: minDocs,
    placeholders: flag('placeholders'),
  });
}
