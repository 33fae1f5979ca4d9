/**
 * The parts of a ticket or e-mail text that are not its new message: the
 * quoted reply history, signatures and the opening greeting. The phrases
 * are how common mail clients and writers phrase them in English, German,
 * French, Spanish, Dutch, Italian and Portuguese (written from knowledge of
 * those clients, not copied from any list).
 *
 * Pure: no I/O.
 *
 * @module
 */

/** Lines removed from one text, by rule (blank lines not counted). */
export interface ReplyCounts {
  /** Lines starting with `>`. */
  quoted: number;
  /** Reply headers and everything under an unquoted one ("-----Original Message-----", "From: … Sent: …", "On … wrote:"). */
  history: number;
  /** Signature blocks. */
  signature: number;
  /** An opening greeting line. */
  greeting: number;
}

/** Which rules to apply. */
export interface ReplyRules {
  readonly quotes: boolean;
  readonly signatures: boolean;
  readonly greetings: boolean;
}

/** Separator lines of forwarded or replied-to messages in Outlook and similar clients. */
const ORIGINAL_MESSAGE =
  /^\s*-{2,}\s*(?:original message|ursprüngliche nachricht|originalnachricht|message d'origine|message original|mensaje original|oorspronkelijk bericht|origineel bericht|messaggio originale|mensagem original)\s*-{2,}\s*$/iu;

/** The first field of an Outlook-style header block: From, Von, De, Van, Da (optionally in bold markers). */
const HEADER_FROM = /^\s*[*_]*(?:from|von|de|van|da)\s*[*_]*\s*:\s*\S/iu;

/** A date field inside such a block: Sent, Date, Gesendet, Datum, Envoyé, Enviado (el), Fecha, Verzonden, Inviato, Data. */
const HEADER_SENT = /^\s*[*_]*(?:sent|date|gesendet|datum|envoyé|enviado(?: el)?|fecha|verzonden|inviato|data)\s*[*_]*\s*:/iu;

/** A rule of underscores Outlook puts above the header block. */
const RULE_LINE = /^\s*_{10,}\s*$/;

/**
 * Reply attribution lines ("On <date>, <name> wrote:"), per language,
 * matched on up to three lines joined (clients wrap long ones):
 * en "On … wrote:", de "Am … schrieb …:" and "… schrieb am …:", fr "Le … a écrit :",
 * es "El … escribió:", nl "Op … schreef …:" and "Op … heeft … het volgende geschreven:",
 * it "Il … ha scritto:", pt "Em … escreveu:".
 */
const ATTRIBUTIONS: readonly RegExp[] = [
  /^on\s.{3,}\swrote\s*:$/iu,
  /^am\s.{3,}\sschrieb(?:\s.{1,120})?\s*:$/iu,
  /^.{1,120}\sschrieb\sam\s.{3,}:$/iu,
  /^le\s.{3,}\sa\sécrit\s*:$/iu,
  /^el\s.{3,}\sescribió\s*:$/iu,
  /^op\s.{3,}\s(?:schreef(?:\s.{1,120})?|het\svolgende\sgeschreven)\s*:$/iu,
  /^il\s.{3,}\sha\sscritto\s*:$/iu,
  /^em\s.{3,}\sescreveu\s*:$/iu,
];

/** Words an attribution line starts with (a cheap test before joining lines). */
const ATTRIBUTION_START = /^\s*(?:on|am|le|el|op|il|em)\s|\sschrieb\sam\s/iu;

/** Sign-off phrases, compared with a line lower-cased, white space collapsed and end punctuation dropped. */
export const SIGN_OFFS: ReadonlySet<string> = new Set([
  // en
  'thanks', 'thank you', 'thanks again', 'many thanks', 'thanks in advance', 'thanks a lot', 'thank you very much', 'thx',
  'cheers', 'regards', 'best regards', 'kind regards', 'warm regards', 'kindest regards', 'with kind regards', 'best wishes',
  'best', 'all the best', 'sincerely', 'yours sincerely', 'sincerely yours', 'yours truly', 'yours faithfully', 'take care',
  'br', 'rgds', 'thank you and regards', 'thanks and regards', 'many thanks and regards',
  // de
  'mit freundlichen grüßen', 'mit freundlichen grüssen', 'mit freundlichem gruß', 'mit freundlichem gruss', 'freundliche grüße',
  'freundliche grüsse', 'viele grüße', 'viele grüsse', 'beste grüße', 'beste grüsse', 'liebe grüße', 'liebe grüsse',
  'herzliche grüße', 'herzliche grüsse', 'schöne grüße', 'schöne grüsse', 'gruß', 'gruss', 'grüße', 'grüsse', 'lg', 'vg',
  'mfg', 'danke', 'vielen dank', 'danke schön', 'danke im voraus', 'besten dank', 'herzlichen dank',
  // fr
  'cordialement', 'bien cordialement', 'très cordialement', 'bien à vous', 'salutations', 'sincères salutations',
  'meilleures salutations', 'bonne journée', 'merci', 'merci beaucoup', "merci d'avance", 'merci par avance', 'amicalement',
  'bien amicalement', 'bises',
  // es
  'saludos', 'un saludo', 'saludos cordiales', 'atentamente', 'cordialmente', 'gracias', 'muchas gracias', 'un abrazo',
  'gracias de antemano', 'gracias por adelantado', 'reciba un cordial saludo', 'un cordial saludo',
  // nl
  'met vriendelijke groet', 'met vriendelijke groeten', 'vriendelijke groet', 'vriendelijke groeten', 'groeten', 'groetjes',
  'hartelijke groet', 'hartelijke groeten', 'bedankt', 'dank je', 'dank u', 'dank je wel', 'dank u wel', 'alvast bedankt', 'mvg',
  // it
  'cordiali saluti', 'distinti saluti', 'saluti', 'un saluto', 'grazie', 'grazie mille', 'a presto', 'buona giornata',
  'grazie in anticipo', 'cordialità',
  // pt
  'atenciosamente', 'cumprimentos', 'melhores cumprimentos', 'com os melhores cumprimentos', 'abraços', 'abraço', 'obrigado',
  'obrigada', 'muito obrigado', 'muito obrigada', 'saudações', 'att', 'grato', 'grata',
]);

/** "Sent from my phone" lines of mail apps, in the seven languages. */
const DEVICE_LINE =
  /^\s*(?:sent from my\s|sent from (?:outlook|mail) for\s|get outlook for\s|von meinem .{1,40} gesendet|gesendet von meinem\s|envoyé de mon\s|envoyé depuis mon\s|enviado desde mi\s|verzonden (?:vanaf|met) mijn\s|inviato da(?:l mio)?\s|enviado do meu\s|enviado de meu\s)/iu;

/** Greeting words a first line may start with, in the seven languages. */
const GREETING =
  /^(?:hi|hello|hey|hiya|dear|good (?:morning|afternoon|evening)|greetings|hallo|hi zusammen|guten (?:morgen|tag|abend)|liebe[rs]?|sehr geehrte[rs]?|moin|servus|bonjour|bonsoir|salut|cher|chère|chers|chères|madame|monsieur|hola|buenos días|buenas(?: tardes| noches)?|estimad[oa]s?|querid[oa]s?|beste|geachte|hoi|goedemorgen|goedemiddag|goedenavond|ciao|salve|buongiorno|buonasera|gentile|gentili|egregio|egregi|car[oa]|cari|olá|ola|oi|bom dia|boa tarde|boa noite|prezad[oa]s?)(?=$|[\s,!:.])/iu;

/** Longest line (in UTF-16 code units) of a signature's name block. */
export const NAME_LINE_MAX = 60;

/** Most non-blank lines a name block under a sign-off may have. */
export const NAME_BLOCK_MAX = 6;

function isBlank(line: string): boolean {
  return line.trim() === '';
}

function flat(line: string): string {
  return line.replace(/[\s\u00a0]+/g, ' ').trim();
}

/** A line's text compared with {@link SIGN_OFFS}: lower case, end punctuation dropped. */
function signOffKey(line: string): string {
  return flat(line)
    .toLowerCase()
    .replace(/[\s,.!;:–—-]+$/u, '');
}

/**
 * True for a sign-off line: a phrase of {@link SIGN_OFFS} alone, or
 * followed by a comma and a capitalised name of up to three words
 * ("Thanks, Maria"; not "Thanks, that fixed it").
 */
export function isSignOff(line: string): boolean {
  const key = signOffKey(line);
  if (SIGN_OFFS.has(key)) return true;
  const comma = key.indexOf(',');
  if (comma === -1) return false;
  if (!SIGN_OFFS.has(key.slice(0, comma).trim())) return false;
  const name = flat(line).slice(comma + 1).replace(/[\s.!]+$/u, '').trim();
  const words = name.split(' ');
  return name !== '' && words.length <= 3 && words.every((w) => /^\p{Lu}/u.test(w));
}

/**
 * True for an opening greeting line: it starts with a greeting word, is at
 * most 60 characters, and ends with `,` `!` or `:` or has at most three
 * words ("Hi team,", "Dear Support Team", "Hola a todos:"; not "Hi, my
 * printer is broken").
 */
export function isGreeting(line: string): boolean {
  const t = flat(line);
  if (t === '' || t.length > 60 || !GREETING.test(t)) return false;
  return /[,!:]$/.test(t) || t.split(' ').length <= 3;
}

/** The attribution starting at line `i` (1–3 lines), as a count of lines, or 0. */
function attributionAt(lines: readonly string[], i: number): number {
  const first = lines[i] as string;
  if (!ATTRIBUTION_START.test(first)) return 0;
  let joined = '';
  for (let n = 1; n <= 3 && i + n - 1 < lines.length; n++) {
    const l = lines[i + n - 1] as string;
    if (n > 1 && (isBlank(l) || /^\s*>/.test(l))) break;
    joined = joined === '' ? flat(l) : `${joined} ${flat(l)}`;
    if (ATTRIBUTIONS.some((re) => re.test(joined))) return n;
  }
  return 0;
}

/** True when an Outlook-style header block starts at line `i`: a From field with a date field within the next four lines. */
function headerBlockAt(lines: readonly string[], i: number): boolean {
  if (!HEADER_FROM.test(lines[i] as string)) return false;
  for (let j = i + 1; j <= i + 4 && j < lines.length; j++) if (HEADER_SENT.test(lines[j] as string)) return true;
  return false;
}

/** Index of the next non-blank line at or after `i`, or `lines.length`. */
function nextContent(lines: readonly string[], i: number): number {
  let j = i;
  while (j < lines.length && isBlank(lines[j] as string)) j++;
  return j;
}

function countContent(lines: readonly string[], from: number, to: number): number {
  let n = 0;
  for (let i = from; i < to; i++) if (!isBlank(lines[i] as string)) n++;
  return n;
}

/**
 * Removes reply headers with the history under them, then quoted (`>`)
 * lines. An attribution followed by quoted lines ("On … wrote:" then `>`
 * lines, as in bottom-posted and interleaved replies) goes alone, so text
 * written between or after the quotes stays; any other reply header cuts
 * everything under it. Adds what it removed to `counts`; returns the lines left.
 */
export function stripHistory(lines: readonly string[], counts: ReplyCounts): string[] {
  const kept: string[] = [];
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i] as string;
    if (ORIGINAL_MESSAGE.test(line) || headerBlockAt(lines, i) || (RULE_LINE.test(line) && headerBlockAt(lines, nextContent(lines, i + 1)))) {
      counts.history += countContent(lines, i, lines.length);
      break;
    }
    const n = attributionAt(lines, i);
    if (n > 0) {
      const after = nextContent(lines, i + n);
      counts.history += n;
      if (after < lines.length && /^\s*>/.test(lines[after] as string)) {
        i += n - 1; // the quoted lines go below; text after them stays
        continue;
      }
      counts.history += countContent(lines, i + n, lines.length); // top-posted: all below is history
      break;
    }
    kept.push(line);
  }
  const out: string[] = [];
  for (const line of kept) {
    if (/^\s*>/.test(line)) counts.quoted++;
    else out.push(line);
  }
  return out;
}

/**
 * Removes the signature (see {@link stripSignature}) and then an opening
 * greeting line, as the rules say. Adds what it removed to `counts`.
 */
export function stripEnds(lines: string[], rules: ReplyRules, counts: ReplyCounts): string[] {
  let out = lines;
  if (rules.signatures) out = stripSignature(out, counts);
  if (rules.greetings) {
    const first = nextContent(out, 0);
    if (first < out.length && isGreeting(out[first] as string)) {
      counts.greeting++;
      out = out.slice();
      out.splice(first, 1);
    }
  }
  return out;
}

/** Lines joined with `\n`, trailing spaces dropped, runs of blank lines collapsed to one, trimmed. */
export function joinLines(lines: readonly string[]): string {
  return lines
    .join('\n')
    .replace(/[ \t]+$/gm, '')
    .replace(/\n{3,}/g, '\n\n')
    .trim();
}

/**
 * Removes reply history and quoted lines ({@link stripHistory}), then the
 * signature and the greeting ({@link stripEnds}) from one text (line
 * endings `\n`), as the rules say. Adds what it removed to `counts`.
 */
export function stripReplies(text: string, rules: ReplyRules, counts: ReplyCounts): string {
  let lines = text.split('\n');
  if (rules.quotes) lines = stripHistory(lines, counts);
  return joinLines(stripEnds(lines, rules, counts));
}

/**
 * The signature: from a `-- ` line to the end (RFC 3676 §4.3; `--` too,
 * as many systems strip the space); "sent from my phone" lines among the
 * last three; and a sign-off among the last lines with only short lines
 * (a name block of at most {@link NAME_BLOCK_MAX} lines of at most
 * {@link NAME_LINE_MAX} characters) under it, from the sign-off on.
 */
export function stripSignature(lines: string[], counts: ReplyCounts): string[] {
  let out = lines;
  // RFC 3676 §4.3: "-- " alone on a line starts the signature ("--" too: many systems strip the space).
  const dash = out.findIndex((l) => l === '-- ' || l.trimEnd() === '--');
  if (dash !== -1) {
    counts.signature += countContent(out, dash, out.length);
    out = out.slice(0, dash);
  }
  // "Sent from my phone" lines among the last three non-blank lines.
  const tail: number[] = [];
  for (let i = out.length - 1; i >= 0 && tail.length < 3; i--) if (!isBlank(out[i] as string)) tail.push(i);
  const device = tail.filter((i) => DEVICE_LINE.test(out[i] as string));
  if (device.length > 0) {
    counts.signature += device.length;
    const drop = new Set(device);
    out = out.filter((_, i) => !drop.has(i));
  }
  // The first sign-off among the last lines under which every line is short (a name block), up to the end.
  const content: number[] = [];
  for (let i = 0; i < out.length; i++) if (!isBlank(out[i] as string)) content.push(i);
  for (let k = Math.max(0, content.length - 1 - NAME_BLOCK_MAX); k < content.length; k++) {
    const i = content[k] as number;
    if (!isSignOff(out[i] as string)) continue;
    const below = content.slice(k + 1);
    if (below.every((j) => (out[j] as string).trim().length <= NAME_LINE_MAX)) {
      counts.signature += content.length - k;
      return out.slice(0, i);
    }
  }
  return out;
}
