/**
 * Generated weekly piles for continuity tests (test data, not demo data):
 * planted themes, each a pool of its own words mixed with words every theme
 * uses; a document is 14 words, about 70% from its theme. Seeded: the same
 * arguments give the same pile.
 */
import { createRng } from '../../src/util/random.js';

/** The planted themes of an invented household help desk, by key. */
export const THEMES: Readonly<Record<string, readonly string[]>> = Object.freeze({
  heating: ['boiler', 'radiator', 'thermostat', 'pilot', 'flame', 'heating', 'warm', 'cold', 'valve', 'pressure'],
  billing: ['invoice', 'refund', 'charge', 'payment', 'card', 'receipt', 'billing', 'overcharged', 'amount', 'statement'],
  parcels: ['parcel', 'courier', 'delivery', 'tracking', 'doorstep', 'van', 'dispatch', 'signature', 'depot', 'label'],
  logins: ['password', 'login', 'account', 'locked', 'reset', 'email', 'code', 'verification', 'username', 'browser'],
  noise: ['noise', 'neighbour', 'music', 'loud', 'party', 'barking', 'dog', 'night', 'complaint', 'drilling'],
  garden: ['hedge', 'lawn', 'mower', 'tree', 'branches', 'leaves', 'gardener', 'pruning', 'weeds', 'compost'],
});

const COMMON = ['please', 'help', 'today', 'again', 'since', 'week', 'still', 'problem', 'thanks', 'urgent', 'morning', 'house'];

/** One week's pile as CSV text (`ticket_id,theme,body`) and the theme of each row. */
export function weeklyPile(week: number, sizes: Readonly<Record<string, number>>, seed = 1): { csv: string; themes: string[] } {
  const rng = createRng(seed * 1000 + week);
  const rows: string[] = ['ticket_id,theme,body'];
  const themes: string[] = [];
  let n = 0;
  for (const [theme, count] of Object.entries(sizes)) {
    const pool = THEMES[theme]!;
    for (let i = 0; i < count; i++) {
      const words: string[] = [];
      for (let w = 0; w < 14; w++) words.push(rng.next() < 0.7 ? pool[rng.int(pool.length)]! : COMMON[rng.int(COMMON.length)]!);
      n++;
      rows.push(`W${week}-${n},${theme},${words.join(' ')}`);
      themes.push(theme);
    }
  }
  return { csv: rows.join('\n') + '\n', themes };
}
