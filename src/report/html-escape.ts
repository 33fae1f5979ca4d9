/**
 * Escaping and formatting helpers of the HTML report. Everything that comes
 * from the documents (text, titles, ids, labels, terms) is untrusted and goes
 * through {@link escapeHtml} or {@link jsonForScript}.
 *
 * @module
 */

const HTML_ESCAPES: Readonly<Record<string, string>> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/**
 * Escapes `&`, `<`, `>`, `"` and `'` so the value is safe both as element
 * text and inside a quoted attribute value. Non-strings are converted with
 * `String()` first (numbers included: a value typed as a number may still be
 * anything at run time).
 */
export function escapeHtml(value: unknown): string {
  return String(value).replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]);
}

/**
 * JSON text that is safe inside `<script type="application/json">`: `<`, `>`,
 * `&`, U+2028 and U+2029 are written as `\u003c`, `\u003e`, `\u0026`,
 * `\u2028`, `\u2029`. Those characters can only occur inside JSON strings,
 * where the escapes mean the same thing, so `JSON.parse` gives back the same
 * value while `</script>`, `<!--` and `<script` cannot appear in the markup.
 */
export function jsonForScript(value: unknown): string {
  const json = JSON.stringify(value);
  if (json === undefined) throw new TypeError('jsonForScript: value has no JSON form');
  return json.replace(/[<>&\u2028\u2029]/g, (c) => '\\u' + c.charCodeAt(0).toString(16).padStart(4, '0'));
}

/** A whole number with `,` between thousands (locale-independent, so output is reproducible). */
export function formatCount(n: number): string {
  if (!Number.isFinite(n)) return '–';
  const s = String(Math.round(Math.abs(n)));
  return (n < 0 ? '-' : '') + s.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/** Fixed decimals, `–` for a missing or non-finite value, never `-0.000`. */
export function formatFixed(n: number | undefined, digits: number): string {
  if (n === undefined || !Number.isFinite(n)) return '–';
  const s = n.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

/** Percentage of `part` in `whole` with one decimal, `–` when the whole is 0. */
export function formatShare(part: number, whole: number): string {
  if (!(whole > 0)) return '–';
  return formatFixed((100 * part) / whole, 1) + '%';
}

/**
 * Shortens to at most `max` code points (never splitting a surrogate pair),
 * ending with `…` when cut. Whitespace runs become one space.
 */
export function truncate(text: string, max: number): string {
  const flat = text.replace(/\s+/g, ' ').trim();
  const points = Array.from(flat);
  if (points.length <= max) return flat;
  return points.slice(0, Math.max(1, max - 1)).join('') + '…';
}

/**
 * Rounds for the embedded data exactly as `toFixed` does (so the page, which
 * shows `toFixed` of the same number of digits, shows what the server-side
 * markup shows); `null` for a non-finite value (JSON has no NaN).
 */
export function roundOrNull(value: number, digits: number): number | null {
  if (!Number.isFinite(value)) return null;
  const r = Number(value.toFixed(digits));
  return Object.is(r, -0) ? 0 : r;
}
