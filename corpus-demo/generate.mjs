#!/usr/bin/env node
// Writes the invented demo corpus for sheaf: support tickets and staff notes of
// "Lanternfen Houseboats", a made-up houseboat hire firm on the made-up Hollin
// Navigation. Every name, place, ticket and note below is invented.
//
// Run: node corpus-demo/generate.mjs
// Deterministic: a seeded PRNG (mulberry32) drives every choice and dates come
// from a fixed invented season, never from the clock, so two runs give
// byte-identical files. No dependencies.

import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const SEED = 20290317;
const HERE = dirname(fileURLToPath(import.meta.url));

// ---------------------------------------------------------------------------
// Seeded randomness
// ---------------------------------------------------------------------------

/** mulberry32: a small 32-bit generator; returns doubles in [0, 1). */
function mulberry32(seed) {
  let a = seed >>> 0;
  return function next() {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function makeRng(seed) {
  const next = mulberry32(seed);
  const rng = {
    next,
    int: (n) => Math.floor(next() * n),
    range: (lo, hi) => lo + Math.floor(next() * (hi - lo + 1)),
    chance: (p) => next() < p,
    pick: (arr) => {
      if (arr.length === 0) throw new Error('pick from empty list');
      return arr[Math.floor(next() * arr.length)];
    },
    weighted: (pairs) => {
      let total = 0;
      for (const [, w] of pairs) total += w;
      let r = next() * total;
      for (const [v, w] of pairs) {
        r -= w;
        if (r < 0) return v;
      }
      return pairs[pairs.length - 1][0];
    },
    shuffle: (arr) => {
      for (let i = arr.length - 1; i > 0; i--) {
        const j = Math.floor(next() * (i + 1));
        const tmp = arr[i];
        arr[i] = arr[j];
        arr[j] = tmp;
      }
      return arr;
    },
    sample: (arr, k) => rng.shuffle(arr.slice()).slice(0, Math.min(k, arr.length)),
  };
  return rng;
}

// ---------------------------------------------------------------------------
// The invented world
// ---------------------------------------------------------------------------

const COMPANY = 'Lanternfen Houseboats';
const SUPPORT_EMAIL = 'guestcare@example.org';

// The hire season: 17 March to 31 October 2029 (UTC). Fixed, never the clock.
const SEASON_START = Date.UTC(2029, 2, 17);
const SEASON_END = Date.UTC(2029, 10, 1); // exclusive
const SEASON_DAYS = Math.round((SEASON_END - SEASON_START) / 86400000);

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
const WEEKDAYS = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];
const WEEKDAYS_SHORT = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'];

const BOATS = [
  { name: "Heron's Errand", cls: 'Willow' },
  { name: 'Slow Biscuit', cls: 'Reed' },
  { name: 'Mabel Grey', cls: 'Alder' },
  { name: 'Little Auk', cls: 'Reed' },
  { name: 'Dun Cow', cls: 'Willow' },
  { name: 'Periwinkle', cls: 'Alder' },
  { name: 'Marsh Lantern', cls: 'Willow' },
  { name: 'Tuppence', cls: 'Reed' },
  { name: 'Patient Otter', cls: 'Alder' },
  { name: 'Ember Reed', cls: 'Willow' },
  { name: 'Sorrel', cls: 'Reed' },
  { name: 'Halfpenny Moon', cls: 'Willow' },
  { name: 'Wandering Coot', cls: 'Alder' },
  { name: 'Old Plum', cls: 'Willow' },
];
const CLASS_LENGTH = { Reed: 12, Willow: 17, Alder: 21 };
const CLASS_BERTHS = { Reed: 2, Willow: 4, Alder: 6 };

const MOORINGS = ['Marrowby Basin', 'Withy Wharf', 'Cold Hollow', "Tanner's Cut", 'Orrin Bridge', 'Pellow Staithe', 'Hesket Junction', 'Fennick Top', 'Brindle Head'];
const LOCKS = ['Saltcote Lock', 'Fennick Top Lock', 'Ambry Lock', 'Gullet Lock', 'Crane Bottom Lock', 'Sisters Lock', "Hob's Lock", 'Pellow River Lock'];
const ROUTES = ['Hollin Ring', 'Brindle Arm', 'Saltcote Level', 'Upper Hollin', 'Pellow Cut', 'Fennick Flight'];
const AGENTS = ['Wren Ashdown', 'Tomasz Klee', 'Priya Marl', 'Dougal Fenn', 'Hattie Moss', 'Ines Carrow'];
const ENGINEERS = ['Col Brennock', 'Sunniva Hale', 'Mattias Roe'];

const FIRST_NAMES = [
  'Amelia', 'Rhys', 'Tobias', 'Nkechi', 'Harriet', 'Callum', 'Priyanka', 'Josef', 'Maeve', 'Oluwaseun',
  'Freya', 'Declan', 'Marisol', 'Ewan', 'Beatrix', 'Hamish', 'Ingrid', 'Kwame', 'Lotte', 'Rosalind',
  'Idris', 'Saoirse', 'Anand', 'Clemency', 'Barnaby', 'Yusuf', 'Elspeth', 'Teodor', 'Niamh', 'Ottilie',
  'Gideon', 'Shira', 'Lucinda', 'Ravi', 'Philippa', 'Aurelio', 'Morwenna', 'Kasimir', 'Delphine', 'Fergus',
  'Thandiwe', 'Ambrose', 'Imogen', 'Cosmo', 'Dafydd', 'Esme', 'Lorcan', 'Jemima', 'Tariq', 'Hester',
  'Magnus', 'Perpetua', 'Quentin', 'Rosamund', 'Sefton', 'Tamsin', 'Verity', 'Wilfred', 'Zoë', 'Bryony',
];
const LAST_NAMES = [
  'Ashcombe', 'Bellweather', 'Corrigan', 'Dunmore', 'Eskdale', 'Fairweather', 'Gantry', 'Holloway', 'Ibbotson', 'Jessop',
  'Kettleby', 'Lumsden', 'Merriman', 'Nettleship', 'Oakhurst', 'Penhallow', 'Quarrie', 'Ravensworth', 'Stainforth', 'Tolland',
  'Underhill', 'Vessey', 'Wetherall', 'Yardley', 'Abara', 'Bhattacharya', 'Castellanos', 'Demir', 'Eriksen', 'Farouk',
  'Grabowski', 'Haddad', 'Iwasaki', 'Jankowski', 'Lindqvist', 'Mensah', 'Nakamura', 'Okonkwo', 'Petrova', 'Quintero',
  'Rasmussen', 'Szabo', 'Udeh', 'Varga', 'Wojcik', 'Yilmaz', 'Zielinski', 'Pickering', 'Marchbanks', 'Greatorex',
  'Hebblethwaite', 'Loveday', 'Spurling', 'Truscott', 'Ollerenshaw', 'Brackley',
];
const FOREIGN_CUSTOMERS = [
  { first: 'Jürgen', last: 'Albers', local: 'juergen.albers' },
  { first: 'Katrin', last: 'Vogelsang', local: 'k.vogelsang' },
  { first: 'Henrike', last: 'Brandl', local: 'henrike.brandl' },
  { first: 'Matthias', last: 'Oberle', local: 'matthias_oberle' },
  { first: 'Sabine', last: 'Kettler', local: 'sabine.kettler' },
  { first: 'Maarten', last: 'de Bruijn', local: 'maarten.debruijn' },
  { first: 'Sanne', last: 'Visscher', local: 'sanne.visscher' },
  { first: 'Joost', last: 'van Dalen', local: 'joostvandalen' },
  { first: 'Femke', last: 'Hoogland', local: 'f.hoogland' },
  { first: 'Pieter', last: 'Kuiper', local: 'pieter.kuiper' },
];

// ---------------------------------------------------------------------------
// Small formatting helpers
// ---------------------------------------------------------------------------

const pad = (n, w) => String(n).padStart(w, '0');
const ordinal = (d) => {
  const s = d % 10 === 1 && d !== 11 ? 'st' : d % 10 === 2 && d !== 12 ? 'nd' : d % 10 === 3 && d !== 13 ? 'rd' : 'th';
  return `${d}${s}`;
};
const thousands = (n) => String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
const money = (pounds, pence) => `£${thousands(pounds)}${pence === undefined ? '' : '.' + pad(pence, 2)}`;
const seasonDay = (rng) => new Date(SEASON_START + rng.int(SEASON_DAYS) * 86400000);
const isoMinute = (ms) => new Date(ms).toISOString().slice(0, 16) + ':00Z';
const slug = (s) => s.toLowerCase().replace(/'/g, '').replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');

function shortDate(rng, d) {
  const day = d.getUTCDate();
  const m = d.getUTCMonth();
  return rng.weighted([
    [`${day} ${MONTHS[m]}`, 4],
    [`${pad(day, 2)}/${pad(m + 1, 2)}`, 2],
    [`${MONTHS[m]} ${ordinal(day)}`, 2],
    [`${WEEKDAYS[d.getUTCDay()]} ${day} ${MONTHS[m]}`, 2],
    [`the ${ordinal(day)} of ${MONTHS[m]}`, 1],
  ]);
}

// ---------------------------------------------------------------------------
// Template slots: {name} is filled once per ticket (so the same boat or
// booking number recurs within one ticket); [a|b|c] picks one alternative.
// ---------------------------------------------------------------------------

const SLOTS = {
  boat: (rng) => rng.pick(BOATS).name,
  class: (rng, ctx) => BOATS.find((b) => b.name === ctx.get('boat')).cls,
  aClass: (rng, ctx) => (ctx.get('class') === 'Alder' ? 'an Alder' : `a ${ctx.get('class')}`),
  len: (rng, ctx) => String(CLASS_LENGTH[ctx.get('class')]),
  mooring: (rng) => rng.pick(MOORINGS),
  mooring2: (rng, ctx) => rng.pick(MOORINGS.filter((m) => m !== ctx.get('mooring'))),
  lock: (rng) => rng.pick(LOCKS),
  route: (rng) => rng.pick(ROUTES),
  booking: (rng) => `BK29-${pad(rng.range(1000, 98999), 5)}`,
  invoice: (rng) => `INV-29${pad(rng.range(100, 9999), 4)}`,
  amountRaw: (rng) => rng.range(36, 520) * 5,
  amount: (rng, ctx) => money(ctx.get('amountRaw'), rng.chance(0.5) ? 0 : undefined),
  amount2: (rng, ctx) => {
    const raw = ctx.get('amountRaw');
    const delta = rng.range(8, 64) * 5;
    return money(raw > delta + 100 && rng.chance(0.5) ? raw - delta : raw + delta, rng.chance(0.5) ? 0 : undefined);
  },
  small: (rng) => money(rng.range(12, 95), rng.pick([0, 50, 0, undefined])),
  depositAmt: (rng) => money(rng.pick([250, 300, 300, 400, 500])),
  dateShort: (rng) => shortDate(rng, seasonDay(rng)),
  dateNum: (rng) => {
    const d = seasonDay(rng);
    return `${pad(d.getUTCDate(), 2)}.${pad(d.getUTCMonth() + 1, 2)}.2029`;
  },
  month: (rng) => rng.pick(['April', 'May', 'June', 'July', 'August', 'September']),
  nights: (rng) => String(rng.range(3, 14)),
  n: (rng) => rng.pick(['two', 'three', 'four', 'five', 'six']),
  pontoon: (rng) => `P${rng.range(1, 24)}`,
  people: (rng) => rng.pick(['two', 'three', 'four', 'five', 'six']),
  hours: (rng) => rng.pick(['two', 'three', 'four', 'five', 'six']),
  last4: (rng) => pad(rng.range(0, 9999), 4),
  txref: (rng) => {
    const abc = 'ABCDEFGHJKLMNPQRSTUVWXYZ0123456789';
    let s = '';
    for (let i = 0; i < 10; i++) s += abc[rng.int(abc.length)];
    return s;
  },
  phone: (rng) => rng.pick(['an Android phone', 'a fairly old Android phone', 'an iPhone', 'a tablet', 'my work phone']),
  dog: (rng) => rng.pick(['small terrier', 'elderly labrador', 'greyhound', 'dachshund', 'cocker spaniel', 'very lazy whippet']),
  reason: (rng) => rng.pick([
    'my husband has broken his ankle',
    'of a family bereavement',
    'my work has cancelled all leave that month',
    'our dog is unwell and we cannot leave her',
    "my daughter's wedding date has moved",
    'my mother has gone into hospital',
    'two of our party have tested positive for flu',
  ]),
  agent: (rng) => rng.pick(AGENTS),
  agentFirst: (rng, ctx) => ctx.get('agent').split(' ')[0],
  engineer: (rng) => rng.pick(ENGINEERS),
  ver: (rng) => rng.pick(['3.2.0', '3.2.1', '3.3.0', '3.3.2']),
  os: (rng) => rng.pick(['Android', 'iOS']),
};

class Ctx {
  constructor(rng, customer) {
    this.rng = rng;
    this.values = new Map([
      ['first', customer.first],
      ['full', customer.full],
      ['email', customer.email],
    ]);
  }
  get(key) {
    if (!this.values.has(key)) {
      const gen = SLOTS[key];
      if (!gen) throw new Error(`unknown slot {${key}}`);
      this.values.set(key, gen(this.rng, this));
    }
    return this.values.get(key);
  }
}

function expand(template, ctx) {
  const rng = ctx.rng;
  const withAlternatives = template.replace(/\[([^[\]]*\|[^[\]]*)\]/g, (_, alts) => rng.pick(alts.split('|')));
  return withAlternatives.replace(/\{(\w+)\}/g, (_, key) => ctx.get(key));
}

// ---------------------------------------------------------------------------
// Ticket themes. Each has its own vocabulary; the "bridges" are sentences that
// borrow another theme's words, to give the realistic overlap.
// ---------------------------------------------------------------------------

// Each core complaint carries the subjects and closing requests that go with
// it (s, a); the theme-wide subjects and asks are vaguer and used now and then.
const THEMES = {
  billing: {
    size: 88,
    channels: [['email', 45], ['web_form', 25], ['phone', 12], ['chat', 10], ['app', 8]],
    priority: [['normal', 70], ['high', 25], ['low', 5]],
    formTopic: 'Billing & payments',
    subjects: ['Query about my invoice', 'Payment question', 'Wrong amount charged', 'Billing problem', 'Invoice for {booking}'],
    core: [
      { t: "[I have been|I've been|We have been] charged twice for booking {booking}: two payments of {amount} [left my account|came out of my account|were taken] on {dateShort}.",
        s: ['Charged twice for booking {booking}', 'Double payment taken!', 'Duplicate charge on my card'], a: ['Could you please refund the duplicate payment?', 'Please refund one of the two payments.'] },
      { t: 'The invoice [you sent me|you e-mailed|I received] ({invoice}) [shows|comes to|says] {amount}, but the quote I [accepted|agreed to|was given] was {amount2}.',
        s: ["Invoice {invoice} doesn't match my quote", 'Invoice higher than quote', 'Wrong total on invoice'], a: ['Please send me a corrected invoice.', 'Can you explain the difference?'] },
      { t: "My card statement shows a payment to {company} of {amount} that I [don't recognise|can't match to anything|never authorised].",
        s: ['Unrecognised payment on my card', 'What is this payment?', 'Payment I did not make'], a: ['Can someone tell me what this payment is for?', 'Please refund it if it was taken by mistake.'] },
      { t: 'The balance for our {class} boat was taken [from my card|from my account] {n} weeks earlier than your [booking terms|terms and conditions] say.',
        s: ['Balance taken early', 'Balance payment taken too soon'], a: ['Please explain why the balance was taken early.'] },
      { t: 'There is [a fuel surcharge|a "fuel top-up" charge|an extra fuel charge] of {small} on my final invoice that nobody mentioned [at handover|when we picked up the boat|at any point].',
        s: ['Fuel surcharge?', 'Unexpected fuel charge on invoice'], a: ['Can someone explain what the extra charge is for?', 'Please remove the surcharge or explain it.'] },
      { t: 'I need a proper VAT invoice with our company name on it for the trip on {boat}; the receipt in the app [is not enough for our accounts|won\'t do for our finance team].',
        s: ['VAT invoice needed for {booking}', 'VAT receipt please', 'Company invoice request'], a: ['Please e-mail a VAT invoice as a PDF.', 'Our finance team needs it by the end of the month.'] },
      { t: 'Your payment page [took the money|charged my card], then showed an error, and now I can see the amount [pending twice|twice on my statement].',
        s: ['Payment error on your website', 'Error at checkout but card charged', 'Paid twice after website error'], a: ['Could you please refund the duplicate payment?', 'Please confirm the booking actually went through.'] },
      { t: 'We paid the [second instalment|balance] by bank transfer on {dateShort} and the invoice still shows it as [unpaid|outstanding].',
        s: ['Bank transfer not showing as paid', 'Instalment marked unpaid'], a: ['Please update the invoice.', 'Can you confirm you received the transfer?'] },
      { t: 'I was charged {amount} for the booking and then another {small} "card fee" that [was never mentioned|nobody told me about].',
        s: ['Card fee on my invoice?', 'Extra card fee charged'], a: ['Please refund the card fee.'] },
    ],
    details: [
      'The transaction reference on my statement is {txref}.',
      "I've attached a screenshot of my bank statement.",
      'The booking was for {nights} nights from {dateShort}.',
      'Your confirmation e-mail says the total is {amount2}.',
      'My bank says the second payment is not pending, it has actually gone through.',
      'The line on the invoice just says "adjustment" with no explanation.',
      'I paid with a card ending {last4}.',
      "I'm happy to pay what we owe, I just want to understand the charges.",
      'This has left me overdrawn, which is not ideal.',
      'The invoice number is {invoice}.',
    ],
    asks: ["I'd like this sorted before the end of the month.", 'Please confirm in writing when the money has gone back to my card.', 'Please look into this.'],
    oneliners: [
      'charged twice for {booking}??', 'Why is there an extra {small} on my invoice?', 'Still waiting for the corrected invoice.',
      'Please send a VAT receipt for {booking}.', 'Payment taken twice, please refund one of them.',
    ],
    bridges: [
      "If this isn't sorted I'll have to think twice about next year's booking.",
      "I tried to check the invoice in the app but it wouldn't let me log in.",
      "I hope this isn't the damage deposit being taken early.",
    ],
    actions: [
      'Checked payments screen, two captures visible. Refund request raised with accounts.',
      'Explained the fuel surcharge. Guest not happy, asked for a call back from a manager.',
      'E-mailed corrected invoice.', 'Sent VAT invoice request to accounts.',
    ],
  },
  moorings: {
    size: 80,
    channels: [['email', 30], ['web_form', 20], ['phone', 20], ['chat', 15], ['app', 15]],
    priority: [['normal', 65], ['low', 25], ['high', 10]],
    formTopic: 'Moorings & locks',
    subjects: ['Mooring question', 'Berth enquiry', 'Question about moorings on the {route}', 'Moorings'],
    core: [
      { t: "[We'd like to|We would like to|I'd like to] reserve [an overnight berth|a berth for one night|a visitor berth] at {mooring} [for the night of|on] {dateShort}.",
        s: ['Overnight mooring at {mooring}', 'Berth booking for {dateShort}', 'Can we book a berth at {mooring}?'], a: ['Please let me know if the berth is available.', 'Can you confirm the mooring by e-mail?'] },
      { t: 'When we [arrived at|got to] {mooring} every visitor mooring was taken, even though the app [showed|said there were] [two|three] free berths.',
        s: ['Visitor moorings full at {mooring}', 'No space at {mooring} despite app'], a: ['Could you check what went wrong with the berth reservation?', 'Where are we supposed to moor when this happens?'] },
      { t: "[Is it possible|Do we need] to book a passage through {lock}? We've [heard|been told] it has to be booked in advance at weekends.",
        s: ['Lock passage at {lock}', 'Booking a lock passage', 'Weekend lock times at {lock}'], a: ['What time slots are there on Saturday?', 'Can you book us in for the morning?'] },
      { t: '[Can we|Would it be possible to] change our return mooring from {mooring} to {mooring2}?',
        s: ['Change of return mooring', 'Return the boat to {mooring2} instead?'], a: ['Please let me know if that is possible and what it costs.'] },
      { t: "The harbour master at {mooring} [told us|said] our berth booking didn't exist[.|, which was embarrassing in front of the whole pontoon.]",
        s: ["Our berth booking 'doesn't exist'", 'Berth reservation missing at {mooring}'], a: ['Could you check what went wrong with the berth reservation?'] },
      { t: 'We [want|would love] to stay two nights at {mooring} instead of one. Can the berth be extended?',
        s: ['Extra night at {mooring}', 'Extend our berth booking'], a: ['Please let me know if the berth is available for the second night.'] },
      { t: '[Which|What] moorings on the {route} have shore power for {aClass} boat?',
        s: ['Shore power moorings on the {route}', 'Moorings with electric hook-up?'], a: ['A list would be really helpful.'] },
      { t: "We're bringing our own boat and would like a long-stay berth at Marrowby Basin from {month}.",
        s: ['Long-stay berth enquiry', 'Long-term mooring at Marrowby Basin'], a: ['What are the monthly berth fees?'] },
      { t: 'We booked the so-called "premium" berth at {mooring} and were put on the far end of the pontoon by the road.',
        s: ['Premium berth at {mooring}', 'Not the berth we paid for'], a: ['Could you check what went wrong with the berth reservation?'] },
    ],
    details: [
      'Our boat is {boat}, {aClass} boat, about {len} metres long.',
      "We're planning to reach {lock} around midday.",
      'The pontoon number on our booking is {pontoon}.',
      'We ended up mooring on the towpath opposite, which was fine but noisy.',
      'There will be {people} of us on board.',
      "We'd prefer a berth near the pub at {mooring} if there's a choice.",
      'The lock keeper said to ask you about the timetable.',
      'Our booking reference is {booking}.',
    ],
    asks: ['What time do we need to arrive to keep the berth?', 'Thanks for your help.', 'Please get back to me soon.'],
    oneliners: [
      'Is there space at {mooring} tonight?', 'Need a berth at {mooring} on {dateShort}, one night.',
      'Can we book {lock} for Saturday morning?', 'visitor moorings at {mooring} all full, where do we go?',
    ],
    bridges: [
      'The app said the berth was confirmed, so I really do not understand what happened.',
      'We paid {small} for that berth and would like it back if it was never available.',
      'We had to run the engine for an hour looking for somewhere to stop.',
    ],
    actions: [
      'Booked berth on the harbour portal, confirmation sent.', 'Told guest to moor on the towpath below {lock}; harbour master informed.',
      'Lock passage booked for 09:30.', 'Checked portal: berth was double-booked. Apologised, moved guest to {mooring2}.',
    ],
  },
  engine: {
    size: 60,
    channels: [['phone', 40], ['chat', 20], ['email', 15], ['app', 15], ['web_form', 10]],
    priority: [['urgent', 35], ['high', 45], ['normal', 20]],
    formTopic: 'Breakdown / technical',
    urgent: true,
    subjects: ['Breakdown near {lock}', '{boat} broken down', 'Engine problem', 'Engine trouble on {boat}'],
    core: [
      { t: "The engine on {boat} won't start [this morning|after lunch|today], it just clicks when I turn the key.",
        s: ["Engine won't start", 'Engine dead this morning'], a: ['Can an engineer come out to us today?'] },
      { t: 'The engine temperature [warning|light] came on after about [an hour|forty minutes|two hours] of cruising and there was steam from the back.',
        s: ['Engine overheating on {boat}', 'Overheating and steam'], a: ['Is it safe to keep going to {mooring}?', 'Can an engineer come out to us today?'] },
      { t: "There's a [strong|really strong] smell of diesel in the engine bay and what looks like fuel in the bilge.",
        s: ['Diesel smell in engine bay', 'Fuel leak?'], a: ['Please send someone to check it, we have stopped the engine.'] },
      { t: 'The engine keeps cutting out when we slow down for locks, [which is frankly terrifying|which nearly put us into the gates] at {lock}.',
        s: ['Engine cutting out at locks', 'Engine stalls at low revs'], a: ['Please send someone before we try another lock.'] },
      { t: '[Black smoke|Thick black smoke] from the exhaust and the engine loses power at anything above tickover.',
        s: ['Black smoke and no power', 'Engine losing power'], a: ['Is it safe to keep going to {mooring}?'] },
      { t: 'The starter battery is flat [again|for the second time], even though we ran the engine for {hours} hours yesterday.',
        s: ['Flat battery again', 'Starter battery flat'], a: ['Can someone bring a new battery?'] },
      { t: "Something is caught round the propeller: there's a horrible knocking and we're barely moving.",
        s: ['Something round the propeller', 'Prop fouled'], a: ['Please send someone as soon as possible, we are stuck.'] },
      { t: "The gear lever is stiff and the boat won't go into reverse properly.",
        s: ["Can't get into reverse", 'Gear lever stuck'], a: ['Can an engineer come out to us today?'] },
      { t: 'The engine alarm keeps beeping and the oil pressure light is on.',
        s: ['Oil pressure light on', 'Engine alarm beeping'], a: ['Should we stop the engine?'] },
    ],
    details: [
      "We're moored just below {lock}.",
      'The oil level looked fine when we checked it this morning.',
      "The alternator belt looks loose to me but I'm no mechanic.",
      "We've checked the weed hatch as shown in the handover video.",
      'The rev counter jumps around.',
      "Another boater had a look and thinks it's the fuel filter.",
      'We cruised about {hours} hours yesterday with no problems at all.',
      'The boat is {boat}, booking {booking}.',
    ],
    asks: ['Please send someone as soon as possible, we are stuck.', 'Please ring me on the boat phone.', 'Please call back.'],
    oneliners: [
      "Engine won't start. At {mooring}. Please call.", 'engine overheating again', "Prop fouled, we're drifting near {lock}!!",
      'battery flat again on {boat}',
    ],
    bridges: [
      "We've lost most of a day, so I think a partial refund would be fair.",
      "I hope the engineer's visit won't come out of our damage deposit.",
      'No engine also means no hot water, so the children are cold as well.',
    ],
    actions: [
      'Engineer {engineer} dispatched, ETA 90 min.', 'Talked guest through the weed hatch. Cleared, engine fine.',
      'Advised not to cruise until engineer arrives. {engineer} on the way.', 'Battery isolator was off. Sorted on the phone.',
    ],
  },
  water_plumbing: {
    size: 48,
    channels: [['phone', 30], ['chat', 20], ['email', 20], ['app', 15], ['web_form', 15]],
    priority: [['high', 45], ['normal', 40], ['urgent', 15]],
    formTopic: 'Water & toilets',
    urgent: true,
    subjects: ['Plumbing problem on {boat}', 'Water problem', 'Bathroom issue'],
    core: [
      { t: 'The [fresh water pump|water pump] [runs constantly|keeps running|won\'t stop] even with all the taps off, and the tank is emptying.',
        s: ["Water pump won't stop", 'Water pump running non-stop'], a: ['Is there a fuse for the water pump we should check?'] },
      { t: "There's no hot water on {boat}; [the calorifier is cold|the tank is stone cold] even after running the engine for [an hour|two hours].",
        s: ['No hot water on {boat}', 'No hot water'], a: ['Can someone come and look at it?'] },
      { t: "The toilet won't flush [properly|at all] and there's a [bad|horrible] smell from the holding tank.",
        s: ['Toilet not flushing', 'Smell from the toilet tank'], a: ['Can someone come and look at the toilet?'] },
      { t: 'We need a pump-out: the toilet tank gauge is showing full after only [three|four] days.',
        s: ['Pump-out needed', 'Toilet tank full already'], a: ['Where is the nearest pump-out station that actually works?'] },
      { t: 'Water is [leaking|seeping] from under the shower tray into the cabin floor.',
        s: ['Leak under the shower', 'Water on the cabin floor'], a: ['Please send someone today if at all possible.'] },
      { t: 'The kitchen tap just splutters air, and we filled the water tank at {mooring} this morning.',
        s: ['No water from the taps', 'Taps only spitting air'], a: ['Is there a fuse for the water pump we should check?'] },
      { t: "The shower drain pump isn't working, so the shower tray fills up and overflows.",
        s: ['Shower tray not draining', 'Shower pump broken'], a: ['Can someone come and look at the plumbing?'] },
    ],
    details: [
      'The floor by the bathroom is soaking wet.',
      "We've switched the water pump off at the panel for now.",
      'The water tank gauge says half full.',
      'The pump-out station at {mooring} was out of order.',
      'We have two small children, so a working toilet is quite important!',
      'It makes a gurgling noise every few minutes.',
      "We're on {boat}, moored near {mooring}.",
    ],
    asks: ['Please send someone today if at all possible.', 'Please call back.', 'Thanks in advance.'],
    oneliners: ['No hot water on {boat}.', 'Toilet blocked, need help', "Where's the nearest working pump-out?", 'water pump wont stop running'],
    bridges: [
      'The hot water is heated by the engine, so maybe it is really an engine problem?',
      "I'd rather the repair didn't come out of our damage deposit.",
      "I couldn't find the pump-out map in the app because it wouldn't log me in.",
    ],
    actions: [
      'Talked guest through resetting the water pump fuse.', 'Engineer booked for tomorrow morning.',
      'Gave directions to the pump-out at {mooring2}.', '{engineer} to attend this afternoon with a spare pump.',
    ],
  },
  cancellations_refunds: {
    size: 72,
    ashore: true, // written before the trip
    channels: [['email', 45], ['web_form', 30], ['phone', 12], ['chat', 8], ['app', 5]],
    priority: [['normal', 70], ['high', 25], ['low', 5]],
    formTopic: 'Cancel or change a booking',
    subjects: ['Cancellation request', 'Our booking {booking}', 'Refund query'],
    core: [
      { t: 'I need to cancel our booking {booking} for {dateShort} because {reason}.',
        s: ['Cancel booking {booking}', 'Cancellation request', 'Please cancel our trip'], a: ['Please send me a cancellation confirmation for the insurer.', 'Please process a full refund.'] },
      { t: "We cancelled our [trip|booking] {n} weeks ago and still haven't [received|seen] the refund you promised.",
        s: ['Where is my refund?', 'Refund still not received'], a: ['Can you tell me when the refund will arrive?'] },
      { t: 'Your website says cancellations more than eight weeks before departure get a full refund, but I was only refunded {amount}.',
        s: ['Refund amount wrong', 'Only a partial refund received'], a: ['Please refund the rest.', 'Please process a full refund.'] },
      { t: "Can we move our [holiday|booking|trip] to next season instead of cancelling? We'd rather not lose the money.",
        s: ['Move our holiday instead of cancelling?', 'Change dates rather than cancel'], a: ['Please let me know the options.'] },
      { t: 'Our trip was cut short by two days because of the canal closure at {lock}. Are we entitled to a partial refund?',
        s: ['Partial refund for canal closure', 'Closure at {lock} shortened our trip'], a: ['Please let me know what you can refund.'] },
      { t: 'I was offered a voucher instead of a refund, but I would [really prefer|much rather have] the money back.',
        s: ['Voucher instead of refund?', 'I want a refund, not a voucher'], a: ['Please process a full refund.'] },
      { t: 'Is there a cancellation fee if we cancel less than a month before we travel?',
        s: ['Cancellation fee question', 'Cost of cancelling late'], a: ['Please let me know the options.'] },
    ],
    details: [
      "I have a doctor's letter if you need it.",
      'We have travel insurance but they want a cancellation invoice from you.',
      'The refund was supposed to take ten working days.',
      "We've booked with you three years running.",
      'I cancelled through the app and got a confirmation e-mail.',
      'The booking was for {boat}, {nights} nights.',
      'The original payment was {amount2}.',
    ],
    asks: ['Please reply as soon as you can.', 'Thank you for your understanding.', 'I look forward to hearing from you.'],
    oneliners: ['Please cancel {booking}.', 'Where is my refund?', 'Still no refund after {n} weeks.', 'Can I cancel without a fee?'],
    bridges: [
      'The refund should go back to the card I paid the balance with, not the old one.',
      "I can't see the cancellation in the app either.",
      'Can the damage deposit be refunded at the same time?',
    ],
    actions: [
      'Cancellation processed, refund of {amount} raised.', 'Offered a date change; guest will think about it.',
      'Chased accounts about the refund.', 'Sent cancellation invoice for the insurer.',
    ],
  },
  app_login: {
    size: 44,
    channels: [['email', 35], ['app', 25], ['chat', 20], ['web_form', 15], ['phone', 5]],
    priority: [['normal', 60], ['low', 25], ['high', 15]],
    formTopic: 'App & account',
    subjects: ['Login problem', 'App not working', 'Account help'],
    core: [
      { t: "I can't log in to the {company} app; it says my password is [incorrect|wrong] even after resetting it[| twice].",
        s: ["Can't log in to the app", 'Password not accepted'], a: ['Can you reset my account?'] },
      { t: "The verification code never arrives. I've tried [three|four|five] times.",
        s: ['Verification code not arriving', 'No login code'], a: ['Can you send the code another way?', 'Is there a known problem with the login?'] },
      { t: 'The app logs me out [every time|whenever] I switch to another app, and then says "session expired".',
        s: ['App keeps logging me out', '"Session expired" all the time'], a: ['Is there a known problem with the login?'] },
      { t: "I made my booking as a guest and now the app won't let me create an account with the same e-mail address.",
        s: ['Account already exists?', "Can't create an account"], a: ['Can you link my booking to an account?'] },
      { t: 'Since the [latest|last] update the app just shows a [white|blank] screen on the login page.',
        s: ['White screen on login', 'App broken since update'], a: ['Is there a known problem with the login?'] },
      { t: 'The password reset link in the e-mail says it has expired as soon as I click it.',
        s: ['Password reset link expired', 'Reset link not working'], a: ['Can you reset my account?'] },
      { t: "My partner booked the trip and I can't see it in my account. Can two people share one login?",
        s: ['Shared booking not in my account', 'Two people, one booking'], a: ['Can you add me to the booking?'] },
    ],
    details: [
      "I'm using {phone}.",
      'My e-mail address is {email}.',
      "I've deleted and reinstalled the app twice.",
      'I need the app for the digital boat manual and the lock timetable.',
      "Logging in on the website works fine, it's only the app.",
      'The app version is {ver}.',
    ],
    asks: ['Please help, we leave on {dateShort}.', 'Thanks.', 'Any help appreciated.'],
    oneliners: ["Can't log in to the app.", 'Verification code not arriving.', 'password reset link expired again', 'App stuck on login screen'],
    bridges: [
      "I need to check my invoice and I can't get to it.",
      'Our berth booking for {mooring} is only in the app, so this is urgent.',
      "I wanted to cancel through the app but I can't get in.",
    ],
    actions: ['Reset the account password, sent a new link.', 'Logged IT ticket for verification SMS delays; sent code by e-mail instead.'],
  },
  damage_deposit: {
    size: 32,
    channels: [['email', 60], ['web_form', 25], ['phone', 15]],
    priority: [['normal', 70], ['high', 30]],
    formTopic: 'Damage deposit',
    subjects: ['Damage deposit', 'Our deposit', 'Deposit query for {booking}'],
    core: [
      { t: '{small} has been kept from our damage deposit for a scratch on the hull that was already there when we picked up {boat}.',
        s: ['Dispute: scratch on hull', 'Damage deposit deduction'], a: ["I'd like the deduction explained with photos, or the full deposit returned."] },
      { t: "We returned the boat on {dateShort} and the security deposit still hasn't been released.",
        s: ['Deposit not returned', 'When do I get my deposit back?'], a: ['Please release the deposit.'] },
      { t: "You've deducted the cost of a new fender from our deposit, but it came off in {lock} and the lock keeper saw it happen.",
        s: ['Deduction for a fender', 'Fender charge'], a: ['Please refund the fender charge.'] },
      { t: 'Why has the [full|whole] deposit been withheld? Nobody mentioned any damage [at handback|when we returned the boat].',
        s: ['Full deposit withheld??', 'Whole deposit kept'], a: ["I'd like the deduction explained with photos, or the full deposit returned."] },
      { t: 'The deposit deduction says "cleaning", but we left the boat [spotless|cleaner than we found it].',
        s: ['Cleaning charge from deposit', 'Cleaning deduction'], a: ['Please send the photos or refund the cleaning charge.'] },
    ],
    details: [
      'I have photos from the handover.',
      'The handback check was done in a hurry and nobody said anything to us.',
      'The deposit was {depositAmt}.',
      'We hired {boat} from {dateShort}.',
      'Our booking reference is {booking}.',
    ],
    asks: ['Please reply by e-mail.', 'I look forward to your reply.'],
    oneliners: ['When will I get my deposit back?', 'Why was {small} taken from the deposit?', 'deposit still not returned for {booking}'],
    bridges: [
      'The invoice says the deposit was refunded but nothing has arrived on my card.',
      'If there is a scratch it probably happened when the engine cut out in {lock}, which was not our fault.',
      "I'm starting to wish we had cancelled.",
    ],
    actions: ['Passed to the handback team for photos.', 'Explained the deduction; guest disputes it. Escalated to the yard manager.'],
  },
  pets: {
    size: 22,
    ashore: true, // written before the trip
    channels: [['email', 40], ['web_form', 30], ['chat', 20], ['phone', 10]],
    priority: [['low', 60], ['normal', 40]],
    formTopic: 'Pets',
    subjects: ['Pets on board', 'Dog question', 'Pet policy'],
    core: [
      { t: 'Can we bring our {dog} on the trip? Very well behaved, I promise.', s: ['Bringing our dog', 'Can our dog come?'], a: ['Please let me know the pet policy.'] },
      { t: 'How many dogs are allowed on {aClass} boat?', s: ['How many dogs allowed?', 'Two dogs on {aClass} boat?'], a: ['Please let me know the pet policy.'] },
      { t: 'Is there a pet fee, and do you lend dog life jackets?', s: ['Pet fee and dog life jackets', 'Dog life jacket?'], a: ['Thanks for letting me know.'] },
      { t: 'We were charged a pet cleaning fee but our dog never went anywhere near the beds.', s: ['Pet cleaning fee charged', 'Unfair pet cleaning fee'], a: ['Please refund the pet cleaning fee.'] },
      { t: 'Are cats allowed on board? Ours travels well and stays indoors.', s: ['Cats on board?', 'Can we bring our cat?'], a: ['Thanks for letting me know.'] },
    ],
    details: [
      'Our dog is fully vaccinated and wormed.',
      "We'll bring the dog's own bed and towels.",
      'Is the towpath at {mooring} all right for walking dogs?',
      'Our {dog} is nine years old and very calm.',
    ],
    asks: ['Thanks!', 'Many thanks.'],
    oneliners: ['Are dogs allowed?', 'Can we bring 2 dogs on {aClass} boat?', 'Is there a pet fee?'],
    bridges: [
      'Would the pet fee come out of the damage deposit or be added to the invoice?',
      'Is there a dog-friendly mooring near {mooring}?',
      "The pet policy page in the app won't load.",
    ],
    actions: ['Confirmed max two dogs, pet fee £35.', 'Sent the pet policy link.'],
  },
};

// Long, rambling tickets borrow from these generic pools; the "afloat" ones
// only suit guests who are on (or just back from) their trip.
const RAMBLES_ANY = [
  "We've been looking forward to this trip since January; it was a sixtieth birthday present for my mum.",
  'My father-in-law worked the coal boats on the Hollin as a boy, so this was meant to be a bit of a pilgrimage for him.',
  "I don't normally write complaints and I hate making a fuss.",
  'We had a similar thing happen with another firm years ago and it took months to sort out, so I would rather deal with it now.',
  'Apologies for the long message, I wanted to give you the full picture.',
  "We're thinking of booking again next year, so it would be good to get this cleared up.",
  'My wife says I am being too polite about all this, so consider this the polite version.',
  "We chose you over the bigger firms because of the reviews, and because you let us bring the dog, so I'm disappointed.",
  "I know it's the busy season and you've probably got a hundred messages like this.",
  'Last year on Periwinkle everything worked perfectly, which is why we came back.',
];
const RAMBLES_AFLOAT = [
  'To be fair the scenery past Cold Hollow was stunning and we saw a kingfisher every single morning.',
  'The staff at the basin were lovely at handover, especially the young woman who did the lock demonstration.',
  'The children have been brilliant at the locks, which is the one bright spot.',
  "It rained solidly for two days, which is nobody's fault, but it didn't help our mood.",
  "I'm writing this from the pub at Withy Wharf because the signal on board is terrible.",
  'Our youngest has been keeping a logbook of every lock and every heron, which has been the funniest part of the week.',
  "I'm not a boat person, my partner is, and I was promised this would be relaxing.",
  "The Wherryman's Rest at Withy Wharf was excellent, by the way; the eel pie is worth the trip on its own.",
];

const GREETINGS = [
  'Hi,', 'Hello,', 'Dear Lanternfen team,', 'Dear Sir or Madam,', 'Good morning,', 'Hi there,', 'Hello Guest Care,',
  'To whom it may concern,', 'Evening all,', 'Hi {agentFirst},',
];
const SIGNOFFS = [
  'Thanks,\n{first}', 'Kind regards,\n{full}', 'Many thanks\n{full}\n{email}', 'Cheers,\n{first}', 'Best wishes,\n{full}\nBooking {booking}',
  'Regards,\n{full}\n\nSent from my phone', 'Thank you in advance,\n{first}', '{first}', 'Yours faithfully,\n{full}',
  'Thanks, {first}', 'Best,\n{full}\n--\nPlease excuse typos, sent from my tablet',
];
const QUOTES = [
  `> On {qdate}, Lanternfen Guest Care <${SUPPORT_EMAIL}> wrote:\n> Thank you for contacting ${COMPANY}. We have received your message and one of the team will reply within two working days.\n>\n> Warm regards from Marrowby Basin,\n> Guest Care`,
  '> -----Original message-----\n> From: Lanternfen Guest Care\n> Subject: Your enquiry\n>\n> Hello {first}, thanks for getting in touch. Could you send us your booking reference so we can look into this?',
  "> On {qdate} {agentFirst} from Lanternfen wrote:\n> I've passed this to the team and we'll come back to you shortly. Sorry for the trouble.\n> {agentFirst}",
];
const RESEND_LINES = [
  "I sent this [last week|on Monday|a few days ago] and haven't had a reply, so here it is again.",
  'Second time asking: please could someone get back to me?',
  "Resending my message as I've heard nothing.",
  "Sorry to chase, but this still isn't resolved.",
];
const CHAT_OPEN = ['hi', 'hello', 'hi there', 'hello?', 'hiya', 'good morning'];
const CHAT_CLOSE = ['thanks', 'thx', 'ok thanks', 'ta', 'cheers', 'thank you'];

// German and Dutch tickets (a few guests write in their own language).
const FOREIGN = [
  { lang: 'de', theme: 'billing', subject: 'Doppelte Abbuchung – Buchung {booking}',
    body: 'Guten Tag,\n\nvon meiner Kreditkarte wurde für die Buchung {booking} zweimal der Betrag von {amount} abgebucht. Die zweite Abbuchung erfolgte am {dateNum}. Bitte erstatten Sie mir den doppelten Betrag so bald wie möglich.\n\nMit freundlichen Grüßen\n{full}' },
  { lang: 'de', theme: 'engine', subject: 'Motor springt nicht an',
    body: 'Hallo,\n\nder Motor der {boat} springt seit heute Morgen nicht mehr an, man hört nur ein Klicken. Wir liegen kurz unterhalb von {lock}. Können Sie bitte einen Techniker schicken?\n\nDanke und viele Grüße\n{first}' },
  { lang: 'de', theme: 'cancellations_refunds', subject: 'Stornierung unserer Reise',
    body: 'Sehr geehrte Damen und Herren,\n\nleider müssen wir unsere Reise vom {dateNum} (Buchung {booking}) stornieren, weil mein Mann krank geworden ist. Bekommen wir die Anzahlung zurück? Für die Reiserücktrittsversicherung brauchen wir außerdem eine Stornobestätigung.\n\nMit freundlichen Grüßen\n{full}' },
  { lang: 'de', theme: 'water_plumbing', subject: 'Kein warmes Wasser, Toilette defekt',
    body: 'Hallo Lanternfen-Team,\n\nauf der {boat} gibt es seit gestern kein warmes Wasser mehr, obwohl der Motor drei Stunden gelaufen ist. Außerdem funktioniert die Toilettenspülung nicht richtig. Wo ist die nächste Abpumpstation?\n\nGruß, {first}' },
  { lang: 'de', theme: 'moorings', subject: 'Liegeplatz in {mooring}',
    body: 'Guten Tag,\n\nwir möchten für die Nacht zum {dateNum} einen Liegeplatz in {mooring} reservieren. Unser Boot ist die {boat}, etwa {len} Meter lang. Gibt es dort Landstrom?\n\nVielen Dank im Voraus\n{full}' },
  { lang: 'nl', theme: 'billing', subject: 'Factuur klopt niet',
    body: 'Beste medewerker,\n\nop factuur {invoice} staat een bedrag van {amount}, maar in de offerte stond {amount2}. Kunt u uitleggen waar het verschil vandaan komt en mij een gecorrigeerde factuur sturen?\n\nMet vriendelijke groet,\n{full}' },
  { lang: 'nl', theme: 'damage_deposit', subject: 'Borg nog steeds niet terugbetaald',
    body: 'Hallo,\n\nwij hebben de {boat} op {dateNum} netjes teruggebracht, maar de borg van {depositAmt} is nog steeds niet teruggestort. Bij de overdracht werd er niets gezegd over schade. Wanneer kunnen we het geld verwachten?\n\nGroeten,\n{full}' },
  { lang: 'nl', theme: 'app_login', subject: 'Inloggen in de app lukt niet',
    body: 'Hoi,\n\nik kan niet inloggen in de Lanternfen-app. De verificatiecode komt nooit aan en na drie pogingen wordt mijn account geblokkeerd. Op de website lukt het wel. Mijn e-mailadres is {email}.\n\nAlvast bedankt,\n{first}' },
  { lang: 'nl', theme: 'pets', subject: 'Hond mee aan boord?',
    body: 'Goedemorgen,\n\nmogen wij onze hond meenemen op een {class}-boot? Het is een rustige labrador van negen jaar. Is er een toeslag voor huisdieren en lenen jullie zwemvesten voor honden uit?\n\nGroetjes,\n{first}' },
  { lang: 'nl', theme: 'engine', subject: 'Motor slaat steeds af',
    body: 'Goedemiddag,\n\nde motor van de {boat} slaat steeds af als we langzaam varen bij de sluizen, vooral bij {lock}. Dat is best eng met kinderen aan boord. Kan er een monteur langskomen? We liggen bij {mooring}.\n\nMet vriendelijke groet,\n{full}' },
];

// ---------------------------------------------------------------------------
// Noise: typos
// ---------------------------------------------------------------------------

const MISSPELL = new Map([
  ['receive', 'recieve'], ['received', 'recieved'], ['definitely', 'definately'], ['separate', 'seperate'],
  ['accommodation', 'accomodation'], ['cancellation', 'cancelation'], ['cancelled', 'canceled'], ['tomorrow', 'tommorow'],
  ['because', 'becuase'], ['please', 'pls'], ['thanks', 'thx'], ['engineer', 'enginer'], ['deposit', 'desposit'],
  ['invoice', 'invoce'], ['booking', 'boking'], ['which', 'wich'], ['really', 'realy'],
]);

function mangle(rng, word) {
  const known = MISSPELL.get(word.toLowerCase());
  if (known && known !== word.toLowerCase() && rng.chance(0.7)) return word[0] === word[0].toUpperCase() ? known[0].toUpperCase() + known.slice(1) : known;
  const i = rng.range(1, word.length - 2);
  switch (rng.int(3)) {
    case 0: return word.slice(0, i) + word[i + 1] + word[i] + word.slice(i + 2); // swap
    case 1: return word.slice(0, i) + word.slice(i + 1); // drop
    default: return word.slice(0, i) + word[i] + word.slice(i); // double
  }
}

function typoify(rng, text, rate) {
  if (rate <= 0) return text;
  return text.replace(/[^\s]+/g, (tok) => {
    if (/[@\d]/.test(tok)) return tok;
    return tok.replace(/[A-Za-z]{4,}/g, (w) => (rng.chance(rate) ? mangle(rng, w) : w));
  });
}

// ---------------------------------------------------------------------------
// Building and rendering tickets
// ---------------------------------------------------------------------------

function pickCreated(rng) {
  const day = rng.int(SEASON_DAYS);
  const hour = rng.weighted([[7, 2], [8, 5], [9, 8], [10, 8], [11, 7], [12, 6], [13, 6], [14, 7], [15, 7], [16, 6], [17, 5], [18, 4], [19, 4], [20, 3], [21, 3], [22, 2], [23, 1], [0, 1], [6, 1]]);
  return SEASON_START + day * 86400000 + hour * 3600000 + rng.int(60) * 60000;
}

/** The date line of a quoted support reply, one to five days before the ticket. */
function replyStamp(rng, created) {
  const d = new Date(created - rng.range(1, 5) * 86400000);
  return `${WEEKDAYS_SHORT[d.getUTCDay()]}, ${d.getUTCDate()} ${MONTHS[d.getUTCMonth()].slice(0, 3)} 2029 at ${pad(rng.range(8, 18), 2)}:${pad(rng.range(0, 59), 2)}`;
}

function buildTicket(rng, themeKey, customer) {
  const th = THEMES[themeKey];
  const channel = rng.weighted(th.channels);
  let style = rng.weighted([['oneliner', 12], ['normal', 72], ['long', 16]]);
  if (channel === 'phone' && style === 'oneliner') style = 'normal';
  if ((channel === 'app' || channel === 'chat') && style === 'long') style = 'normal';
  const created = pickCreated(rng);
  const ctx = new Ctx(rng, customer);
  ctx.values.set('company', COMPANY);
  ctx.values.set('qdate', replyStamp(rng, created));
  const x = (tpl) => expand(tpl, ctx);
  const core = rng.pick(th.core);
  const ask = () => x(core.a && rng.chance(0.7) ? rng.pick(core.a) : rng.pick(th.asks));

  let paragraphs;
  if (style === 'oneliner') {
    paragraphs = [[x(rng.pick(th.oneliners))]];
  } else if (style === 'normal') {
    const p1 = [x(core.t), ...rng.sample(th.details, rng.range(0, 2)).map(x)];
    const p2 = [];
    if (rng.chance(0.18)) p2.push(x(rng.pick(th.bridges)));
    if (rng.chance(0.75)) p2.push(ask());
    paragraphs = p2.length > 0 && rng.chance(0.5) ? [p1, p2] : [[...p1, ...p2]];
  } else {
    const details = rng.sample(th.details, rng.range(3, 4)).map(x);
    const rambles = rng.sample(th.ashore ? RAMBLES_ANY : [...RAMBLES_ANY, ...RAMBLES_AFLOAT], rng.range(1, 4)).map(x);
    const p1 = [...(rng.chance(0.5) ? [rambles.shift()] : []), x(core.t), details[0]];
    const p2 = details.slice(1);
    if (rng.chance(0.5)) p2.push(x(rng.pick(th.bridges)));
    if (rng.chance(0.3)) p2.push(x(rng.pick(THEMES[rng.pick(Object.keys(THEMES))].bridges)));
    const p3 = [...rambles, ask()];
    paragraphs = [p1, p2, p3].filter((p) => p.length > 0);
  }

  // typos: heavier in chat and the app, light in some e-mails
  const typoRate = channel === 'chat' ? 0.07 : channel === 'app' ? 0.04 : rng.chance(0.2) ? 0.025 : 0;
  paragraphs = paragraphs.map((p) => p.map((s) => typoify(rng, s, typoRate)));
  const lower = channel === 'chat' && rng.chance(0.5);

  // subject: usually one that matches the complaint, sometimes a vague one
  let subject = x(style !== 'oneliner' && rng.chance(0.8) ? rng.pick(core.s) : rng.pick(th.subjects));
  if (th.urgent && rng.chance(0.12)) subject = `URGENT - ${subject}`;
  if (rng.chance(0.05)) subject = subject.toLowerCase();
  const quote = channel === 'email' && style !== 'oneliner' && rng.chance(0.14) ? x(rng.pick(QUOTES)) : '';
  if (quote) subject = `Re: ${subject}`;
  else if (channel === 'email' && rng.chance(0.03)) subject = '(no subject)';
  if (channel === 'app') subject = `In-app: ${subject}`;

  const t = {
    theme: themeKey,
    channel,
    style,
    lang: 'en',
    customer,
    ctx,
    created,
    priority: rng.weighted(th.priority),
    subject,
    paragraphs,
    lower,
    greeting: channel === 'email' && (style !== 'oneliner' || rng.chance(0.3)) && rng.chance(0.85) ? x(rng.pick(GREETINGS)) : '',
    signoff: channel === 'email' && rng.chance(0.85) ? x(rng.pick(SIGNOFFS)) : '',
    quote,
    form: {
      booking: rng.chance(0.7) ? x('{booking}') : '',
      boat: rng.chance(0.5) ? x('{boat}') : '',
      topic: rng.chance(0.4) ? (rng.chance(0.15) ? rng.pick(['General enquiry', 'Other', 'Feedback']) : th.formTopic) : '',
      email: rng.chance(0.3) ? customer.email : '',
    },
    chatOpen: rng.chance(0.7) ? rng.pick(CHAT_OPEN) : '',
    chatClose: rng.chance(0.6) ? rng.pick(CHAT_CLOSE) : '',
    phone: { agent: x('{agent}'), action: x(rng.pick(th.actions)), withBooking: rng.chance(0.6) ? x('{booking}') : '' },
    app: { ver: x('{ver}'), os: x('{os}') },
    body: null,
  };
  return t;
}

function stripEnd(s) {
  return s.replace(/[.!]+$/, '');
}

/** Pure: turns the structure chosen in buildTicket into the body text. */
function render(t) {
  if (t.lang !== 'en') return t.body;
  const paras = t.paragraphs.map((p) => p.join(' '));
  switch (t.channel) {
    case 'email': {
      let body = [t.greeting, ...paras, t.signoff].filter(Boolean).join('\n\n');
      if (t.quote) body += `\n\n${t.quote}`;
      return body;
    }
    case 'web_form': {
      const head = [];
      if (t.form.booking) head.push(`Booking reference: ${t.form.booking}`);
      if (t.form.boat) head.push(`Boat: ${t.form.boat}`);
      if (t.form.topic) head.push(`Topic: ${t.form.topic}`);
      if (t.form.email) head.push(`Email: ${t.form.email}`);
      const text = paras.join('\n\n');
      return head.length ? `${head.join('\n')}\n\nMessage:\n${text}` : text;
    }
    case 'chat': {
      let lines = t.paragraphs.flat();
      if (t.lower) lines = lines.map((s) => stripEnd(s.toLowerCase()));
      return [t.chatOpen, ...lines, t.chatClose].filter(Boolean).join('\n');
    }
    case 'phone': {
      const said = t.paragraphs.flat().join(' ');
      const caller = t.phone.withBooking ? `${t.customer.full} (booking ${t.phone.withBooking})` : t.customer.full;
      return `Phone call logged by ${t.phone.agent}.\nCaller: ${caller}\nGuest said: "${said}"\nAction: ${t.phone.action}`;
    }
    case 'app':
      return `${paras.join('\n\n')}\n\n-- sent from the Lanternfen app (v${t.app.ver}, ${t.app.os})`;
    default:
      throw new Error(`unknown channel ${t.channel}`);
  }
}

function makeCustomers(rng, count) {
  const seen = new Set();
  const out = [];
  const domains = ['example.com', 'example.com', 'example.org', 'example.net'];
  while (out.length < count) {
    const first = rng.pick(FIRST_NAMES);
    const last = rng.pick(LAST_NAMES);
    const full = `${first} ${last}`;
    if (seen.has(full)) continue;
    seen.add(full);
    const f = first.normalize('NFD').replace(/[\u0300-\u036f]/g, '').toLowerCase();
    const l = last.toLowerCase();
    const local = rng.weighted([[`${f}.${l}`, 5], [`${f[0]}${l}`, 2], [`${f}_${l}${rng.range(1, 99)}`, 1], [`${f}${rng.range(60, 99)}`, 1], [`${l}.${f}`, 1]]);
    out.push({ first, last, full, email: `${local}@${rng.pick(domains)}` });
  }
  return out;
}

/** A few days after the original, but never past the end of the season. */
function resendTime(rng, created) {
  const later = created + rng.range(2, 9) * 86400000 + rng.range(-300, 300) * 60000;
  return later < SEASON_END ? later : created + rng.range(3, 20) * 3600000;
}

function generateTickets(rng) {
  const customers = makeCustomers(rng, 330);
  const themeList = [];
  for (const [key, th] of Object.entries(THEMES)) for (let i = 0; i < th.size; i++) themeList.push(key);
  rng.shuffle(themeList);

  const tickets = themeList.map((key) => buildTicket(rng, key, rng.pick(customers)));

  // A few guests write in German or Dutch.
  const used = new Set();
  FOREIGN.forEach((f, i) => {
    const idx = tickets.findIndex((t, j) => t.theme === f.theme && !used.has(j) && t.style !== 'oneliner');
    if (idx < 0) throw new Error(`no ticket left to turn into ${f.lang} for ${f.theme}`);
    used.add(idx);
    const fc = FOREIGN_CUSTOMERS[i];
    const customer = { first: fc.first, last: fc.last, full: `${fc.first} ${fc.last}`, email: `${fc.local}@${i % 2 ? 'example.net' : 'example.org'}` };
    const ctx = new Ctx(rng, customer);
    const t = tickets[idx];
    Object.assign(t, { lang: f.lang, customer, ctx, channel: 'email', style: 'foreign', subject: expand(f.subject, ctx), body: expand(f.body, ctx) });
  });

  // Near-copies: the same complaint re-sent a few days later with small edits.
  const candidates = tickets
    .map((t, i) => i)
    .filter((i) => !used.has(i) && ['email', 'web_form'].includes(tickets[i].channel) && tickets[i].style !== 'oneliner');
  const nearOriginals = rng.sample(candidates, 8).sort((a, b) => a - b);
  const nearCopies = nearOriginals.map((i) => {
    const o = tickets[i];
    const th = THEMES[o.theme];
    const x = (tpl) => expand(tpl, o.ctx);
    const paragraphs = o.paragraphs.map((p) => p.slice());
    // replace one sentence (never the opening complaint) with a fresh detail, or add one
    const spots = [];
    paragraphs.forEach((p, pi) => p.forEach((_, si) => { if (pi > 0 || si > 0) spots.push([pi, si]); }));
    const present = new Set(paragraphs.flat());
    const fresh = () => {
      for (let tries = 0; tries < 20; tries++) {
        const d = x(rng.pick(th.details));
        if (!present.has(d)) return d;
      }
      return x(rng.pick(th.asks));
    };
    if (spots.length >= 2 && rng.chance(0.6)) {
      const [pi, si] = rng.pick(spots);
      paragraphs[pi][si] = fresh();
    } else {
      paragraphs[paragraphs.length - 1].push(fresh());
    }
    paragraphs.unshift([x(rng.pick(RESEND_LINES))]);
    const subject = rng.weighted([[`Fwd: ${o.subject}`, 2], [`${o.subject} (2nd request)`, 2], [`Still waiting: ${o.subject}`, 1], [o.subject, 1]]);
    return {
      ...o,
      paragraphs,
      subject,
      greeting: o.greeting && rng.chance(0.5) ? x(rng.pick(GREETINGS)) : o.greeting,
      created: resendTime(rng, o.created),
      priority: o.priority === 'normal' ? 'high' : o.priority,
      kind: 'near_copy',
      of: o,
    };
  });

  // Exact duplicates: the web form submitted twice a minute or two apart.
  const dupCandidates = tickets.map((t, i) => i).filter((i) => !used.has(i) && !nearOriginals.includes(i) && tickets[i].channel === 'web_form' && tickets[i].style === 'normal');
  const dupOriginals = rng.sample(dupCandidates, 3).sort((a, b) => a - b);
  const dups = dupOriginals.map((i) => ({ ...tickets[i], created: tickets[i].created + rng.range(1, 3) * 60000, kind: 'exact_duplicate', of: tickets[i] }));

  const all = [...tickets, ...nearCopies, ...dups];
  for (const t of all) t.body = render(t);
  all.forEach((t, i) => { t.order = i; });
  all.sort((a, b) => a.created - b.created || a.order - b.order);
  all.forEach((t, i) => { t.id = `LF-${31001 + i}`; });
  return all;
}

// ---------------------------------------------------------------------------
// CSV (RFC 4180: CRLF between records, fields quoted when they hold a comma,
// a double quote or a line break; quotes doubled)
// ---------------------------------------------------------------------------

function csvField(v) {
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function toCsv(header, rows) {
  return [header, ...rows].map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
}

// ---------------------------------------------------------------------------
// Notes: maintenance logs, staff handbook, guest feedback digests, routes
// ---------------------------------------------------------------------------

const escHtml = (s) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

function htmlPage(title, blocks) {
  const body = blocks
    .map((b) => {
      if (b.h2) return `<h2>${escHtml(b.h2)}</h2>`;
      if (b.ul) return `<ul>\n${b.ul.map((li) => `  <li>${escHtml(li)}</li>`).join('\n')}\n</ul>`;
      return `<p>${escHtml(b.p)}</p>`;
    })
    .join('\n');
  return `<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n<title>${escHtml(title)}</title>\n</head>\n<body>\n<h1>${escHtml(title)}</h1>\n${body}\n</body>\n</html>\n`;
}

function mdPage(title, blocks) {
  const body = blocks
    .map((b) => {
      if (b.h2) return `## ${b.h2}`;
      if (b.ul) return b.ul.map((li) => `- ${li}`).join('\n');
      return b.p;
    })
    .join('\n\n');
  return `# ${title}\n\n${body}\n`;
}

const page = (ext, title, blocks) => (ext === 'html' ? htmlPage(title, blocks) : mdPage(title, blocks));

function noteDate(rng, monthLo, monthHi) {
  const m = rng.range(monthLo, monthHi);
  const d = rng.range(1, 28);
  return { m, d, key: m * 100 + d, text: `${d} ${MONTHS[m].slice(0, 3)}` };
}

const LOG_ENTRIES = [
  'Engine service at {hours} engine hours: oil and oil filter changed, fuel filter replaced, water trap drained.',
  'Fresh water pump running on with taps closed; pressure switch replaced, pump tested against every tap.',
  'No hot water reported by guests. Calorifier hose clamp had slipped; refitted and tested after a 40 minute engine run.',
  'Propeller fouled below {lock}: cleared on site. Two metres of blue rope and a duvet cover.',
  'Starter battery read {volts} V under cranking; replaced. Domestic bank tested fine.',
  'Alternator belt retensioned; charging at 14.2 V at cruising revs.',
  'Gear cable stiff going into reverse; greased and adjusted at the gearbox end.',
  "Toilet macerator blocked (wipes). Cleared, new 'nothing but paper' sign fitted in the bathroom.",
  'Pump-out at base; holding tank gauge recalibrated, it was reading full at half.',
  'Shower drain pump float switch cleaned of hair; pump replaced as a precaution.',
  'Engine cutting out at tickover. Idle speed raised slightly, fuel lift pump checked. Watch this one.',
  'Bilge pump automatic switch stuck; freed and tested. Bilge dry.',
  'Scrape on the port bow from the cill at {lock}; touched up, photo added to the handover folder.',
  'Fender lost by guests in {lock}; replaced from stores.',
  'Overheating alarm on the way back from {mooring}: raw water strainer full of weed, cleared, impeller checked.',
  'Diesel smell in the engine bay: weeping joint on the fuel return line, new washer fitted, bilge cleaned.',
  'Leak under the shower tray: silicone seal redone, floorboard dried out with a heater overnight.',
  'Smoke alarm and carbon monoxide alarm tested, batteries replaced.',
  'Gas locker drain cleared; bubble test on the gas system passed.',
  'Weed hatch seal renewed; clamp bar and bolt greased.',
  'Cabin heater fuel pump clicking; reseated the connector, working again.',
  'Water tank filled and chlorinated after the winter lay-up.',
];

function maintenanceLog(rng, boat, ext) {
  const ctx = new Ctx(rng, { first: '', full: '', email: '' });
  ctx.values.set('volts', (rng.range(96, 112) / 10).toFixed(1));
  ctx.values.set('hours', String(rng.range(18, 62) * 50));
  const entries = rng.sample(LOG_ENTRIES, rng.range(6, 9)).map((e) => ({ date: e.includes('winter lay-up') ? noteDate(rng, 2, 2) : noteDate(rng, 2, 9), text: expand(e, ctx) }));
  entries.sort((a, b) => a.date.key - b.date.key);
  const blocks = [
    { p: `${boat.name} is ${boat.cls === 'Alder' ? 'an' : 'a'} ${boat.cls} class boat (${CLASS_BERTHS[boat.cls]} berths, ${CLASS_LENGTH[boat.cls]} m). Log kept by the yard at Marrowby Basin; newest entries at the bottom. Engine hours are read off the panel at every visit.` },
    { h2: 'Season 2029' },
    { ul: entries.map((e) => `${e.date.text}: ${e.text}`) },
    { p: rng.pick([
      'Next service due at the end of the season. Hull blacking booked for the winter slipway slot.',
      'Nothing outstanding. Guests have been kind to this one.',
      'Outstanding: keep an eye on the fuel system, and check the calorifier hoses before the August rush.',
      'Outstanding: order a spare water pump to keep on board for the rest of the season.',
    ]) },
  ];
  return { path: `ops/maintenance-log-${slug(boat.name)}.${ext}`, theme: 'maintenance', content: page(ext, `Maintenance log: ${boat.name}`, blocks) };
}

function pumpOutLog(rng) {
  const causes = ['hose split', 'pump motor tripped', 'card reader dead', 'blocked intake', 'power cut to the kiosk', 'vandalised lid'];
  const stations = ['Withy Wharf', 'Cold Hollow', 'Pellow Staithe', 'Fennick Top', "Tanner's Cut"];
  const items = [];
  for (let i = 0; i < 7; i++) {
    const d = noteDate(rng, 3, 9);
    const st = rng.pick(stations);
    const alt = rng.pick(['Marrowby Basin', ...stations.filter((s) => s !== st)]);
    items.push({ d, text: `${d.text}: ${st} out of order (${rng.pick(causes)}). Guests sent to ${alt}. Back in service after ${rng.range(1, 6)} day(s).` });
  }
  items.sort((a, b) => a.d.key - b.d.key);
  return {
    path: 'ops/pump-out-station-log.txt',
    theme: 'maintenance',
    content: mdPage('Pump-out station log, 2029', [
      { p: 'Every outage at a pump-out station on our waters, and where guests were sent instead. The stations belong to the Navigation, not to us, but our guests are the ones who need them, so we keep our own record and chase repairs.' },
      { ul: items.map((x) => x.text) },
      { p: 'Pattern: Withy Wharf and Cold Hollow fail most, always in the busiest weeks. We have asked the Navigation for a second pump at Withy Wharf.' },
    ]),
  };
}

function calloutSummary(rng) {
  const causes = [
    ['Fouled propeller', rng.range(14, 22)], ['Flat starter battery', rng.range(8, 13)], ['Overheating', rng.range(5, 9)],
    ['Fuel or diesel smell', rng.range(2, 5)], ['Gear cable / reverse', rng.range(2, 5)], ['Water pump', rng.range(4, 8)],
    ['Toilet or pump-out', rng.range(5, 10)], ['Other', rng.range(2, 6)],
  ];
  const total = causes.reduce((n, [, c]) => n + c, 0);
  return {
    path: 'ops/engineering-callouts-july.md',
    theme: 'maintenance',
    content: mdPage('Engineering callouts, July 2029', [
      { p: `${total} callouts this month across the fleet of ${BOATS.length} boats, handled by ${ENGINEERS.join(', ')}. Median time from call to engineer on the towpath: ${rng.range(48, 75)} minutes.` },
      { ul: causes.map(([c, n]) => `${c}: ${n}`) },
      { p: 'Fouled propellers are still the biggest single cause, and most of them could have been cleared by guests through the weed hatch. The handover demonstration of the weed hatch is now compulsory, see the handover procedure.' },
      { p: 'Flat starter batteries cluster on the Reed boats, whose batteries are the oldest in the fleet. All Reed starter batteries are on the winter refit list.' },
    ]),
  };
}

function slipwaySchedule(rng) {
  const boats = rng.sample(BOATS, 7);
  let week = 45;
  const rows = boats.map((b) => {
    week += rng.range(1, 2);
    return `Week ${week}: ${b.name}: ${rng.pick(['hull blacking and anodes', 'blacking, new rubbing strake on the port side', 'blacking, weed hatch frame re-welded', 'survey and blacking', 'blacking and a new stern gland'])}.`;
  });
  return {
    path: 'ops/slipway-and-blacking-schedule.md',
    theme: 'maintenance',
    content: mdPage('Slipway and hull blacking schedule, winter 2029', [
      { p: 'The slipway at Marrowby Basin takes one boat at a time. Each boat is out of the water for a week: pressure washed, dried for two days, blacked with two coats, and anodes checked. The order below puts the boats with the worst cill scrapes first.' },
      { ul: rows },
      { p: 'Boats not on the list this winter were blacked last winter and only need an inspection from the pontoon.' },
    ]),
  };
}

function winterRefit(rng) {
  const jobs = [
    'Replace calorifier hoses on every Willow boat (hot water complaints all summer).',
    'New starter batteries on all Reed boats.',
    'Fit a second fresh water pump isolation switch by the galley on the Alder boats.',
    'Re-seal every shower tray; replace the shower drain pumps older than five years.',
    'Service every gearbox and replace the stiffest gear cables.',
    'Recover and repaint the fender stock; buy twenty new fenders.',
    'Replace the toilet tank gauges that read high.',
    'Check all weed hatch seals and clamp bars.',
  ];
  return {
    path: 'ops/winter-refit-plan.html',
    theme: 'maintenance',
    content: htmlPage('Winter refit plan, 2029 to 2030', [
      { p: `The fleet comes out of service on 1 November and the first boats go back on hire in mid-March. ${rng.range(9, 12)} weeks of yard time, two engineers full time and a third from January.` },
      { h2: 'Fleet-wide jobs' },
      { ul: rng.sample(jobs, 6) },
      { h2: 'Order of work' },
      { p: 'Slipway work first (see the blacking schedule), then engines and gearboxes, then plumbing. Interior jobs and cushions last, when the heaters can run in the boats without the doors open all day.' },
    ]),
  };
}

// Staff handbook snippets, written out in full.
const HANDBOOK = [
  { path: 'crew/handover-procedure.md', title: 'Handover procedure for departing guests', paras: [
    'Handover starts at 14:00 on the pontoon, not in the office. Allow forty minutes a boat; Alder boats with first-time crews take closer to an hour.',
    'Walk the guests round the outside first: mooring ropes, centre line, fenders, pole and plank, and the weed hatch. Show them it is bolted down and where the clamp bar lives. Then the engine bay: where to check the oil, the water trap and the bilge pump switch. Do not skip the weed hatch: most of our July callouts were fouled propellers that guests could have cleared themselves.',
    'Inside: the water pump switch on the panel, hot water and the calorifier, the toilet and its tank gauge, the gas locker and the isolation valve, and the boat phone in the chart drawer.',
    "Finish with a short trip out to the winding hole and back with the guest on the tiller. Photograph the hull on both sides before they leave and upload the photos to the boat's folder; the handback team needs them for the deposit check.",
  ] },
  { path: 'crew/handback-and-deposit-checks.md', title: 'Handback and deposit checks', paras: [
    'Boats come back between 08:30 and 09:30 on the last day. Meet each boat on the pontoon and walk round it with the guests while they are still on board, comparing with the handover photos.',
    'Any new damage: photograph it with a ruler in the shot, tell the guests there and then, and write it on the handback sheet. Never hold back any of a deposit for damage the guests were not told about at handback. Lost fenders are only charged if the lost-fender box on the handover sheet was ticked.',
    'Cleaning deductions only when the boat needs more than the standard turnaround clean. Dog hair on the bedding counts; muddy floors do not.',
    'Accounts release deposits within five working days, so the handback sheet must be in the office by noon. If a guest disputes a deduction, send the photos first and argue second.',
  ] },
  { path: 'crew/engine-callouts.md', title: 'Taking an engine callout by phone', paras: [
    'Ask where the boat is (nearest lock, bridge number or mooring) and whether it is safe: moored, drifting, or in a lock. A boat drifting or stuck in a lock comes first: ring the lock keeper and send the on-call engineer straight away.',
    'Then ask what happens when they turn the key: nothing, a click, or the engine turns over but will not fire. Ask about warning lights, the colour of any smoke, and any smell of diesel.',
    'Fixes that work over the phone: the weed hatch for a knocking propeller, the battery isolator switched off by mistake, the stop cable left pulled out, the gear lever not in neutral. Stay on the line while they try.',
    'Log every callout with the boat, the engine hours and the cause, even when it was solved on the phone. The monthly callout summary is built from these logs.',
  ] },
  { path: 'crew/pets-on-board.md', title: 'Pets on board', paras: [
    'Up to two dogs on Willow and Alder boats, one on Reed boats. Cats and other pets by arrangement only; ask the office.',
    'The pet fee is £35 a stay and covers the extra cleaning. Dog life jackets in three sizes are in the store by the office, free to borrow: offer one at every handover where a dog is coming aboard.',
    'Dogs are not allowed on the beds or the dinette cushions. If we find dog hair on the bedding at handback, the cleaning deduction applies, and the photos go with it.',
    'The towpath along the Brindle Arm has cattle in summer. Tell guests to keep dogs on a lead there, and to keep them off the lock gates everywhere.',
  ] },
  { path: 'crew/refunds-and-cancellations.md', title: 'Cancellations, date changes and refunds: staff summary', paras: [
    'More than eight weeks before departure: full refund less a £50 admin fee. Four to eight weeks: half the hire charge back. Under four weeks: nothing back unless we manage to re-let the boat.',
    'Always offer a date change first; it is free once, within the same season or the next. A voucher is an option, never the only option: if a guest asks for the money, they get the money under the rules above.',
    'Refunds go back to the card that paid, and accounts need ten working days. Tell guests that number, not "a few days".',
    'Canal closures: if the Navigation closes a stretch and guests lose cruising days, refund the lost nights pro rata without waiting for a complaint. For travel insurers, send the cancellation invoice from the shared drive.',
  ] },
  { path: 'crew/phone-and-chat-manner.md', title: 'Phone and chat manner', paras: [
    'Answer with "Lanternfen, Marrowby Basin" and your first name. Guests on the water are often stressed: stuck, cold, and sometimes with small children. Use calm, short sentences, and do not promise an arrival time you cannot keep.',
    'On chat, reply within three minutes during office hours, use the guest\'s name, and avoid abbreviations. If a question needs the yard, say so and say when you will come back.',
    'Before you answer a ticket, read the whole thread and search for the guest\'s name: many guests write twice, or send the same message again a few days later when they have heard nothing. Merge the copies and answer once.',
  ] },
  { path: 'crew/boat-phones-and-radios.txt', title: 'Boat phones and yard radios', paras: [
    'Every boat carries a basic mobile phone in the chart drawer, with the Guest Care and on-call numbers stored under A and B so they come first. Check at every turnaround that it is charged and has credit.',
    'Yard radios: channel 2 for the yard and the office, channel 4 for the lock keepers on the Fennick Flight. Radios live on the charging rack by the office door and go back there at the end of every shift.',
    'Dead zones with no phone signal: the Gorse Hill tunnel and the Cold Hollow cutting. Warn guests at handover, and tell them to ring from the moorings either side.',
  ] },
  { path: 'crew/rota-and-season-rules.txt', title: 'Rota rules for the season', paras: [
    'The season runs from mid-March to the end of October. Saturday is changeover day and everybody works Saturdays; Wednesdays are the second, smaller changeover.',
    'One engineer is on call every day from 07:00 to 22:00. The on-call phone is handed over at 07:00 at the yard, in person, never left in a drawer.',
    'Shift swaps go on the rota board and must be agreed with Priya before the week starts. Time off in August is limited to one person from each team at a time; ask early.',
  ] },
  { path: 'crew/closing-up-the-basin.md', title: 'Closing up the basin at night', paras: [
    'Last walk round at 21:30. Check every pontoon: hire boats tied with bow and stern lines and a spring, fenders down, no ropes across the walkway.',
    'Lock the fuel pump and switch off the pump-out kiosk. Check the office windows, and put the day\'s handback sheets in the accounts tray.',
    'The gate code changes every Monday; the new code goes on the whiteboard in the office, and is texted to guests who are staying on the basin moorings that week.',
    'If a hire boat is expected back late, leave the pontoon lights on and tell the on-call engineer.',
  ] },
  { path: 'crew/app-and-account-help.md', title: 'Helping guests with the app and their account', paras: [
    'Most login trouble is one of three things. The guest booked without an account and is now trying to make one with the same e-mail address; the verification code is stuck at the text message provider; or they are on an old version of the app.',
    'For the first, link the booking to a new account from the admin screen. For stuck codes, send the code by e-mail instead. For old versions, ask them to update before anything else.',
    'Never ask for a guest\'s password, and never read a reset link out over the phone. If two people share a booking, add the second person as a crew member on the booking rather than sharing one login.',
  ] },
];

const LOCK_BRIEFING_V1 = [
  'Every crew that has not boated before gets this briefing at the first lock, which for most of our guests is Ambry Lock, half an hour from the basin. It takes twenty minutes. Do it even when the guests say they have watched the video.',
  'Going up: the boat goes into the empty lock and the steerer holds it near the front with a little forward gear. The crew shut the bottom gates, then open the top paddles slowly, one at a time, a third at first.',
  'The cill is the ledge of stone under the top gates. Going down, keep the boat well forward of the cill marker on the lock wall, because if the back of the boat catches on it as the water drops, the boat can tip. Say this twice.',
  'Windlasses: one for each crew member working the lock, with a hand kept on it while the paddle is moving. Never leave a windlass on a spindle. Lost windlasses go in the canal, and sometimes into somebody\'s face.',
  'At the Fennick Flight the lock keepers run the flight at weekends. Tell guests to follow their timetable and to ask them for help; they would rather help than fish out a boat.',
];
const LOCK_BRIEFING_V2 = LOCK_BRIEFING_V1.slice();
LOCK_BRIEFING_V2[2] = 'The cill is the stone step under the top gates, and it is the most dangerous thing in any lock. Going down, keep the whole boat forward of the white cill marker painted on the lock wall. If the stern settles on the cill as the water drops, the bow goes down and the boat can flood within a minute. If that starts to happen, shut the bottom paddles at once and shout for the lock keeper. Say all of this twice, and ask the steerer to point at the marker.';

const PRAISE = [
  'Handover staff at Marrowby Basin, mentioned by name in {k} forms, Hattie and Dougal most often.',
  'The Fennick Flight lock keepers: patient, funny and quick to help nervous crews.',
  'Clean, well-stocked boats. The welcome box (bread, milk, local jam) keeps getting compliments.',
  'Wildlife on the Brindle Arm: bitterns, otters, and one claimed family of water voles.',
  'The digital boat manual in the app, from the guests who could log in.',
  'Dog-friendly boats and the free dog life jackets.',
  'Quick engineer callouts: several guests said help arrived within the hour.',
  'The Saltcote Level at sunset, and the quiet of the Cold Hollow moorings.',
];
const GRIPES = [
  'Hot water: {k} complaints, mostly on Willow boats. Calorifier hoses again.',
  'Pump-out stations out of order at Withy Wharf and Cold Hollow for part of the month.',
  'App login: verification codes arriving late or not at all.',
  'Damage deposit deductions disputed, usually for cleaning or lost fenders.',
  'Double charges from the payment page when the card check timed out.',
  'Queues at the Fennick Flight on Saturdays; some crews waited over two hours.',
  'Engines cutting out at low revs on two boats (both since fixed).',
  "Visitor moorings full at Tanner's Cut on market days.",
  'Slow refunds after cancellations: several guests waited more than ten working days.',
];
const GUEST_QUOTES = [
  '"We went slower than walking pace for a week and it was the best holiday we have had in years." (a couple on Little Auk)',
  '"The lock keeper at Fennick had my nine-year-old running the whole flight by lock four." (family of five on Periwinkle)',
  '"Lovely boat, but please, please fix the shower pump." (two friends on Dun Cow)',
  '"The app kept logging me out, so we used the paper manual, which was better anyway." (group of four on Marsh Lantern)',
  '"Our old spaniel loved it. So did we." (Tuppence)',
  '"Being told at handback that we had lost a fender we were never given was not the ending we wanted." (Slow Biscuit)',
  '"Help arrived on a bicycle with a toolbag within forty minutes. Hero." (Heron\'s Errand)',
  '"Paid twice, refunded once, still waiting on the second." (Sorrel)',
];
const ACTIONS = [
  'Calorifier hoses on all Willow boats to be replaced in the winter refit.',
  'Guest Care to send verification codes by e-mail when the text message fails.',
  'Handback team to share photos with every deposit deduction, no exceptions.',
  'Accounts to check the payment page for duplicate card captures every morning.',
  'Ask the Navigation again for a second pump-out at Withy Wharf.',
  'Publish Fennick Flight passage slots a week ahead in the app.',
  'Refund turnaround target cut to five working days.',
];

function feedbackDigest(rng, month, ext, prevAvg) {
  const ctx = new Ctx(rng, { first: '', full: '', email: '' });
  const forms = rng.range(38, 120);
  const reviews = rng.range(9, 40);
  const avg = (rng.range(38, 47) / 10).toFixed(1);
  const k = () => String(rng.range(3, 14));
  const fill = (s) => expand(s.replace('{k}', k()), ctx);
  const blocks = [
    { p: `${forms} feedback forms and ${reviews} online reviews this month. Average score ${avg} out of 5${prevAvg ? ` (last month ${prevAvg})` : ''}. Digest compiled by Guest Care from the forms handed in at handback and the reviews.` },
    { h2: 'What guests loved' },
    { ul: rng.sample(PRAISE, rng.range(3, 4)).map(fill) },
    { h2: 'What went wrong' },
    { ul: rng.sample(GRIPES, rng.range(3, 4)).map(fill) },
    { h2: 'In their words' },
    { ul: rng.sample(GUEST_QUOTES, 2) },
    { h2: 'Actions' },
    { ul: rng.sample(ACTIONS, 2) },
  ];
  return { note: { path: `guests/feedback-digest-2029-${pad(month + 1, 2)}.${ext}`, theme: 'guest_feedback', content: page(ext, `Guest feedback digest: ${MONTHS[month]} 2029`, blocks) }, avg };
}

function surveySummary(rng) {
  const n = rng.range(410, 560);
  const again = rng.range(68, 84);
  return {
    path: 'guests/end-of-season-survey-summary.md',
    theme: 'guest_feedback',
    content: mdPage('End-of-season guest survey: summary', [
      { p: `${n} guests answered the survey we send a week after every hire. ${again}% said they would book with us again, and the average overall score was ${(rng.range(40, 46) / 10).toFixed(1)} out of 5.` },
      { h2: 'Scores by topic' },
      { ul: [
        `The boat, clean and comfortable: ${(rng.range(41, 48) / 10).toFixed(1)}`,
        `Handover and lock briefing: ${(rng.range(43, 49) / 10).toFixed(1)}`,
        `Help when something went wrong: ${(rng.range(36, 45) / 10).toFixed(1)}`,
        `Booking, payments and refunds: ${(rng.range(31, 40) / 10).toFixed(1)}`,
        `The app: ${(rng.range(27, 36) / 10).toFixed(1)}`,
      ] },
      { p: 'The gap is clear: guests love the boats and the people, and are frustrated by the paperwork around them. Payments, refunds, deposits and the app login score lowest, and together they make up most of the written complaints.' },
      { p: 'Free-text answers most often mention the lock keepers, the kingfishers, hot water, and the app.' },
    ]),
  };
}

const COMPLIMENTS = [
  'Thank you for the loveliest week. The boys want to live on Periwinkle now.',
  'Dougal, you are a saint for coming out in the rain for our propeller.',
  'Best birthday present ever. Mum steered the whole Saltcote Level.',
  'The welcome jam was gone by Tuesday. Please sell it!',
  'Saw an otter at Brindle Head at six in the morning. Worth the whole trip.',
  'Hot water took some persuading but the team sorted it in an hour.',
  'We will be back. Our dog Pickle sends her regards.',
  'Thank you to the lock keeper at Fennick who taught our daughter to work a paddle.',
  'Quiet, slow, green. Exactly what we came for.',
];

function complimentsBook(rng) {
  return {
    path: 'guests/compliments-book-extracts.txt',
    theme: 'guest_feedback',
    content: mdPage('Compliments book extracts', [
      { p: 'Copied out from the visitor book in the office at Marrowby Basin, for the noticeboard and the staff meeting. Spelling tidied, names left out.' },
      { ul: rng.sample(COMPLIMENTS, 7) },
    ]),
  };
}

const ROUTES_DATA = [
  { file: 'the-fennick-flight', ext: 'html', title: 'The Fennick Flight', from: 'Marrowby Basin', to: 'Fennick Top', km: 11, locks: 9, hours: '5 to 6',
    intro: 'The classic first day out of Marrowby. After an easy hour along the valley floor the canal climbs out of the Hollin valley through the seven locks of the Fennick Flight, each with a side pond, and then two single locks before the long quiet pound to Fennick Top.',
    highlights: ['The view back down the flight from lock five, best in the evening.', 'The Tollhouse café at the top lock, for bacon rolls and windlass keyrings.', 'Herons fishing the side ponds at dawn.'],
    cautions: ["From May to September the flight runs to the lock keepers' timetable at weekends: book a passage slot through Guest Care or the app.", 'Draw the side-pond paddle before the ground paddle, never both at once.', 'Going down, keep the boat well forward of the cill.'],
    moorings: ['Fennick Top visitor moorings: 14 berths, shore power on six of them, 48 hours.', 'Flight Bottom: four berths, no facilities, a noisy road bridge.'] },
  { file: 'the-brindle-arm', ext: 'html', title: 'The Brindle Arm', from: 'Hesket Junction', to: 'Brindle Head', km: 8, locks: 0, hours: '3',
    intro: 'A narrow, reedy branch that wanders off the main line at Hesket Junction and ends at Brindle Head, where the old brickworks basin now belongs to the bitterns. There are no locks at all, which makes it a favourite for a slow afternoon.',
    highlights: ['Bitterns booming in the reed beds in April and May.', 'The hand-operated swing bridge at Oxlease, the crew\'s moment of glory.', 'The orchard at Brindle Head sells cider in September.'],
    cautions: ['Shallow beyond Oxlease: Alder boats must turn at the Brindle winding hole, a kilometre short of the head.', 'Cattle on the towpath in summer; dogs on leads.', 'No water point anywhere on the arm: fill up at Hesket Junction.'],
    moorings: ['Brindle Head: six berths, no power.', 'Oxlease bridge: towpath mooring with pins.'] },
  { file: 'the-hollin-ring', ext: 'md', title: 'The Hollin Ring (one week)', from: 'Marrowby Basin', to: 'Marrowby Basin', km: 64, locks: 31, hours: '26',
    intro: 'Our signature week: a full circle of the Hollin Navigation, out across the Saltcote Level, up the Fennick Flight, through the Gorse Hill tunnel to Pellow Staithe, and home down the river section of the Upper Hollin.',
    highlights: ['Every landscape we have in one week: marsh, valley, woods and river.', 'Pellow Staithe market on Thursdays.', 'The last evening at Withy Wharf, one hour from home.'],
    cautions: ['The Upper Hollin is a river: check the flow boards at Pellow before you set off, and on a red board stay put.', 'Go anticlockwise so you climb the Fennick Flight early in the week while everyone is fresh.'],
    moorings: ['Saltcote, Fennick Top, Pellow Staithe and Withy Wharf all have water points and pump-outs.'] },
  { file: 'the-saltcote-level', ext: 'md', title: 'The Saltcote Level', from: 'Marrowby Basin', to: 'Saltcote Lock', km: 14, locks: 1, hours: '4',
    intro: 'A long, lock-free pound across the reclaimed salt marsh, straight as a ruler between two rows of poplars, with old wind pumps standing in the fields. Big skies, and on a windy day a surprisingly hard steer for the high-sided Alder boats.',
    highlights: ['Sunsets over the marsh.', 'Marsh harriers quartering the fields.', 'Saltcote Lock still has an old flood gauge painted on its wall.'],
    cautions: ['Side winds: slow down, and keep the bow pointing slightly into the wind.', 'Very few trees for shade; bring hats and water.'],
    moorings: ['Saltcote visitor moorings below the lock: ten berths, water point, pump-out.', 'Poplar Reach: towpath pins, no facilities.'] },
  { file: 'the-pellow-cut', ext: 'md', title: 'The Pellow Cut and Gorse Hill tunnel', from: 'Pellow Staithe', to: 'Orrin Bridge', km: 9, locks: 4, hours: '3.5',
    intro: 'A short, busy link with four locks and the Gorse Hill tunnel, 380 metres long and only wide enough for one boat. Traffic lights at both portals control the tunnel; wait for green.',
    highlights: ['The brick portals of the tunnel, with the year 1794 carved over the north end.', 'Orrin Bridge village shop, good for bread and milk.'],
    cautions: ['Headlight on and everyone except the steerer inside the cabin in the tunnel.', 'There is no phone signal in the tunnel.', 'Water drips from the roof: close the hatches.'],
    moorings: ['Orrin Bridge: eight berths, water point.', 'Pellow Staithe: see the Upper Hollin route.'] },
  { file: 'cold-hollow-and-the-gullet', ext: 'md', title: 'Cold Hollow and the Gullet', from: 'Hesket Junction', to: 'Gullet Lock', km: 6, locks: 2, hours: '2.5',
    intro: 'The canal runs through the deep, wooded Cold Hollow cutting and then drops through Gullet Lock, the deepest on the Navigation at 4.2 metres. A dark, quiet and slightly spooky stretch that guests either love or hurry through.',
    highlights: ['Ferns and moss on the cutting walls, and bluebells in May.', 'The Cold Hollow moorings, the quietest on our waters.'],
    cautions: ['Gullet Lock is deep: going down, stay forward of the cill marker and use the centre line, not the stern rope.', 'No phone signal in the cutting.', 'Fallen branches after storms; go slowly round the bends.'],
    moorings: ['Cold Hollow: five berths in the woods, pump-out (often out of order, check the log).'] },
  { file: 'tanners-cut', ext: 'md', title: "Tanner's Cut through Marrowby", from: 'Marrowby Basin', to: 'Crane Bottom Lock', km: 5, locks: 2, hours: '2',
    intro: "The town route: through the middle of Marrowby past the old tanneries, now flats and cafés, under three lift bridges and down Hob's Lock and Crane Bottom Lock. Slow, sociable, and full of people watching from the bridges.",
    highlights: ['Saturday market, a two-minute walk from the town moorings.', 'The Lantern and Eel, the pub our boats are named after more often than you would think.'],
    cautions: ['Lift bridges need a crew member ashore with a windlass, and road traffic has to be stopped.', 'The rowing club trains on Sunday mornings; give them room.'],
    moorings: ["Tanner's Cut town moorings: twelve berths, 48 hours, full on market days."] },
  { file: 'withy-wharf-short-break', ext: 'txt', title: 'Withy Wharf short break', from: 'Marrowby Basin', to: 'Withy Wharf', km: 12, locks: 3, hours: '4',
    intro: "Our suggestion for two or three nights: out through Ambry Lock and Sisters Lock, along the willow-lined reach where the kingfishers live, and one more lock down to Withy Wharf and the Wherryman's Rest.",
    highlights: ['Kingfishers on the willow reach, almost guaranteed in the morning.', "The Wherryman's Rest: food until nine, dogs welcome."],
    cautions: ['Ambry Lock is where we do the lock briefing; take your time.', 'The winding hole at Withy Wharf is tight for Alder boats.'],
    moorings: ['Withy Wharf: sixteen berths, water point, pump-out (one pump, queues in August).'] },
  { file: 'the-upper-hollin', ext: 'md', title: 'The Upper Hollin (river section)', from: 'Pellow Staithe', to: 'Marrowby Basin', km: 18, locks: 5, hours: '5',
    intro: 'Below Pellow Staithe the Navigation joins the river Hollin for eighteen kilometres. The locks are big river locks worked by keepers, and the river is wide, with a current you can feel after rain.',
    highlights: ['Water meadows and the old ferry crossing at Pellow.', 'Being worked through the big locks by a keeper: no windlass needed.'],
    cautions: ['Flow boards at every lock: green go, amber only if you are experienced, red stay moored and ring us.', 'Moor with slack in the ropes; river levels change overnight.', 'Keep away from the weir streams below each lock.'],
    moorings: ['Pellow Staithe: twenty berths, shore power, market on Thursdays.', 'Pellow River Lock: keeper-run, waiting pontoon above and below.'] },
];

function routeNote(r) {
  const blocks = [
    { p: r.intro },
    { p: `${r.from === r.to ? `A round trip from ${r.from}` : `From ${r.from} to ${r.to}`}. Distance ${r.km} km, ${r.locks === 0 ? 'no locks' : `${r.locks} lock${r.locks === 1 ? '' : 's'}`}, cruising time about ${r.hours} hours.` },
    { h2: 'Highlights' },
    { ul: r.highlights },
    { h2: 'Take care' },
    { ul: r.cautions },
    { h2: 'Moorings' },
    { ul: r.moorings },
  ];
  return { path: `routes/${r.file}.${r.ext}`, theme: 'routes', content: page(r.ext, r.title, blocks) };
}

function generateNotes(rng) {
  const notes = [];
  // maintenance logs
  const logBoats = BOATS.filter((b) => ["Heron's Errand", 'Slow Biscuit', 'Periwinkle', 'Marsh Lantern', 'Tuppence', 'Patient Otter'].includes(b.name));
  logBoats.forEach((b, i) => notes.push(maintenanceLog(rng, b, i % 3 === 2 ? 'txt' : 'md')));
  notes.push(pumpOutLog(rng), calloutSummary(rng), slipwaySchedule(rng), winterRefit(rng));
  // staff handbook
  for (const h of HANDBOOK) notes.push({ path: h.path, theme: 'handbook', content: mdPage(h.title, h.paras.map((p) => ({ p }))) });
  notes.push({ path: 'crew/drafts/lock-briefing-v1.md', theme: 'handbook', content: mdPage('Lock briefing for first-time crews (draft v1)', LOCK_BRIEFING_V1.map((p) => ({ p }))) });
  notes.push({ path: 'crew/drafts/lock-briefing-v2.md', theme: 'handbook', content: mdPage('Lock briefing for first-time crews (draft v2)', LOCK_BRIEFING_V2.map((p) => ({ p }))) });
  // guest feedback
  let prev = '';
  for (let m = 3; m <= 9; m++) {
    const { note, avg } = feedbackDigest(rng, m, m === 7 ? 'html' : 'md', prev);
    notes.push(note);
    prev = avg;
  }
  notes.push(surveySummary(rng), complimentsBook(rng));
  // routes
  for (const r of ROUTES_DATA) notes.push(routeNote(r));
  return notes;
}

function wordCount(text) {
  const plain = text.replace(/<[^>]+>/g, ' ');
  return (plain.match(/[A-Za-zÀ-ÿ0-9£'’.-]+/g) ?? []).filter((w) => /[A-Za-z0-9]/.test(w)).length;
}

// ---------------------------------------------------------------------------
// Main
// ---------------------------------------------------------------------------

function main() {
  const tickets = generateTickets(makeRng(SEED));
  const notes = generateNotes(makeRng(SEED ^ 0x9e3779b9));

  for (const n of notes) {
    const w = wordCount(n.content);
    if (w < 80 || w > 400) throw new Error(`note ${n.path} has ${w} words; want 80 to 400`);
  }

  const header = ['ticket_id', 'created', 'channel', 'customer', 'subject', 'body', 'category', 'priority'];
  const rows = tickets.map((t) => [t.id, isoMinute(t.created), t.channel, t.customer.full, t.subject, t.body, t.theme, t.priority]);
  writeFileSync(join(HERE, 'tickets.csv'), toCsv(header, rows));

  const notesDir = join(HERE, 'notes');
  rmSync(notesDir, { recursive: true, force: true });
  for (const n of notes) {
    const p = join(notesDir, n.path);
    mkdirSync(dirname(p), { recursive: true });
    writeFileSync(p, n.content);
  }

  const sizes = {};
  for (const key of Object.keys(THEMES)) sizes[key] = tickets.filter((t) => t.theme === key).length;
  const truth = {
    note: 'Invented demo data. Ground truth planted by corpus-demo/generate.mjs.',
    seed: SEED,
    tickets: {
      rows: tickets.length,
      category_sizes: sizes,
      near_copies: tickets.filter((t) => t.kind === 'near_copy').map((t) => ({ original: t.of.id, copy: t.id, category: t.theme })),
      exact_duplicates: tickets.filter((t) => t.kind === 'exact_duplicate').map((t) => ({ original: t.of.id, copy: t.id, category: t.theme })),
      other_language: tickets.filter((t) => t.lang !== 'en').map((t) => ({ id: t.id, lang: t.lang, category: t.theme })),
    },
    notes: {
      files: notes.length,
      themes: notes.reduce((acc, n) => ({ ...acc, [n.theme]: (acc[n.theme] ?? 0) + 1 }), {}),
      by_file: notes.map((n) => ({ path: `notes/${n.path}`, theme: n.theme, words: wordCount(n.content) })),
      near_copies: [{ a: 'notes/crew/drafts/lock-briefing-v1.md', b: 'notes/crew/drafts/lock-briefing-v2.md', changed: 'third paragraph (the cill) rewritten; title says v1/v2' }],
    },
  };
  writeFileSync(join(HERE, 'truth.json'), JSON.stringify(truth, null, 2) + '\n');

  const lines = [`tickets.csv: ${tickets.length} rows`, ...Object.entries(sizes).map(([k, v]) => `  ${k}: ${v}`), `notes/: ${notes.length} files`];
  process.stdout.write(lines.join('\n') + '\n');
}

main();
