/**
 * The report page's one inline script, as constant text (no data inside, so
 * its CSP hash is stable). It reads the embedded data block with `JSON.parse`,
 * routes views by the URL hash, and builds the document lists, the list of
 * near-duplicate sets and the set pages with `createElement`/`textContent`
 * only: no `innerHTML`, no `eval`, no handler attributes, links only to `#…`.
 *
 * Lists are paged (50 rows) and searched/sorted over the embedded columns, so
 * the page stays usable with 100k documents: nothing is built until a view
 * is first shown, and search input is debounced.
 *
 * @module
 */

/** JavaScript of the report page (ES2019, no modules, no dependencies). */
export const REPORT_SCRIPT = String.raw`(function () {
'use strict';
var doc = document;
doc.documentElement.className = 'js';
var PAGE = 50;
var MEMBERS_PAGE = 20;
var CONTEXT_WORDS = 12;
var data;
try {
  data = JSON.parse(doc.getElementById('sheaf-data').textContent);
} catch (err) {
  var fail = doc.getElementById('route-notice');
  if (fail) { fail.hidden = false; fail.textContent = 'The data embedded in this report could not be read.'; }
  doc.documentElement.className = 'no-js';
  return;
}
var D = data.documents;
var n = D.id.length;
var baseTitle = doc.title;
var collator = new Intl.Collator(undefined, { numeric: true, sensitivity: 'base' });

var groupLabel = new Map();
for (var gi = 0; gi < data.groups.id.length; gi++) groupLabel.set(data.groups.id[gi], data.groups.label[gi]);
var byGroup = new Map();
var ungrouped = [];
var indexOfId = new Map();
for (var i = 0; i < n; i++) {
  var g = D.group[i];
  if (g < 0) ungrouped.push(i);
  else {
    var list = byGroup.get(g);
    if (!list) { list = []; byGroup.set(g, list); }
    list.push(i);
  }
  if (!indexOfId.has(D.id[i])) indexOfId.set(D.id[i], i);
}
var sets = data.duplicates ? data.duplicates.sets : [];
var setById = new Map();
for (var si = 0; si < sets.length; si++) setById.set(sets[si].id, sets[si]);

var hayCache = new Array(n);
function docHay(i) {
  var h = hayCache[i];
  if (h === undefined) { h = (D.id[i] + '\n' + D.title[i]).toLowerCase(); hayCache[i] = h; }
  return h;
}

// ---- DOM helpers: text only, never markup ----
function el(tag, props, kids) {
  var node = doc.createElement(tag);
  if (props) {
    for (var key in props) {
      if (!Object.prototype.hasOwnProperty.call(props, key)) continue;
      var v = props[key];
      if (v === null || v === undefined || v === false) continue;
      if (key === 'text') node.textContent = String(v);
      else if (key === 'className') node.className = v;
      else node.setAttribute(key, v === true ? '' : String(v));
    }
  }
  if (kids) for (var k = 0; k < kids.length; k++) append(node, kids[k]);
  return node;
}
function append(node, kid) {
  if (kid === null || kid === undefined || kid === false) return;
  node.appendChild(typeof kid === 'string' ? doc.createTextNode(kid) : kid);
}
function count(x) {
  var s = String(Math.round(Math.abs(x)));
  return (x < 0 ? '-' : '') + s.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}
function fixed(x, d) {
  if (x === null || x === undefined || !isFinite(x)) return '\u2013';
  var s = Number(x).toFixed(d);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}
function groupLink(id) {
  if (id < 0 || !groupLabel.has(id)) return el('span', { className: 'muted', text: 'none' });
  return el('a', { href: '#group-' + id, text: id + ' \u00b7 ' + groupLabel.get(id) });
}
function setLink(id) {
  if (id < 0) return el('span', { className: 'muted' }, [el('span', { 'aria-hidden': 'true', text: '\u2013' }), el('span', { className: 'visually-hidden', text: 'none' })]);
  return el('a', { href: '#set-' + id, text: 'set ' + id });
}
function docTitle(i) {
  var t = D.title[i];
  return t === '' ? '(untitled)' : t;
}

// ---- pager ----
function makePager(label, onChange) {
  var prev = el('button', { type: 'button', text: '\u2190 Previous' });
  var next = el('button', { type: 'button', text: 'Next \u2192' });
  var where = el('span', { className: 'page-of' });
  var box = el('nav', { className: 'pager', 'aria-label': label }, [prev, where, next]);
  var page = 0;
  var pages = 1;
  prev.addEventListener('click', function () { if (page > 0) { page--; onChange(page); } });
  next.addEventListener('click', function () { if (page < pages - 1) { page++; onChange(page); } });
  return {
    node: box,
    set: function (p, total) {
      pages = Math.max(1, total);
      page = Math.min(Math.max(0, p), pages - 1);
      where.textContent = 'Page ' + count(page + 1) + ' of ' + count(pages);
      prev.disabled = page === 0;
      next.disabled = page >= pages - 1;
      box.hidden = pages <= 1;
      return page;
    },
  };
}

// ---- searchable, sortable, paged table ----
// cfg: { caption, noun, searchLabel, items, columns: [{ key, title, num, sort, cell }], hay, sortKey, sortDir }
var tableCount = 0;
function makeTable(mount, cfg) {
  var uid = 'list-' + (++tableCount);
  var state = { key: cfg.sortKey, dir: cfg.sortDir || 1, query: '', page: 0 };
  var sorted = cfg.items;
  var visible = cfg.items;
  var input = el('input', { type: 'search', id: uid + '-q', autocomplete: 'off', spellcheck: 'false' });
  var status = el('p', { className: 'status', id: uid + '-status', role: 'status', 'aria-live': 'polite' });
  input.setAttribute('aria-describedby', uid + '-status');
  var tools = el('div', { className: 'tools' }, [el('label', { for: uid + '-q', text: cfg.searchLabel + ' ' }), input, status]);
  var heads = [];
  var tr = el('tr');
  cfg.columns.forEach(function (col) {
    var th = el('th', { scope: 'col', className: col.num ? 'num' : null });
    if (col.sort) {
      var b = el('button', { type: 'button', text: col.title });
      b.addEventListener('click', function () {
        if (state.key === col.key) state.dir = -state.dir;
        else { state.key = col.key; state.dir = col.num ? -1 : 1; }
        state.page = 0;
        resort(); refilter(); draw();
      });
      th.appendChild(b);
    } else th.textContent = col.title;
    heads.push({ col: col, th: th });
    tr.appendChild(th);
  });
  var tbody = el('tbody');
  var table = el('table', { className: 'rows' }, [el('caption', { className: 'visually-hidden', text: cfg.caption }), el('thead', null, [tr]), tbody]);
  var pager = makePager(cfg.caption + ': pages', function (p) { state.page = p; draw(); });
  mount.replaceChildren(tools, table, pager.node);

  function resort() {
    var col = null;
    for (var c = 0; c < cfg.columns.length; c++) if (cfg.columns[c].key === state.key) col = cfg.columns[c];
    if (!col || !col.sort) { sorted = cfg.items; return; }
    var dir = state.dir;
    var cmp = col.sort;
    sorted = cfg.items.slice().sort(function (a, b) { return dir * cmp(a, b) || a - b; });
  }
  function refilter() {
    var q = state.query;
    if (!q) { visible = sorted; return; }
    var out = [];
    for (var r = 0; r < sorted.length; r++) if (cfg.hay(sorted[r]).indexOf(q) >= 0) out.push(sorted[r]);
    visible = out;
  }
  function draw() {
    var pages = Math.ceil(visible.length / PAGE);
    state.page = pager.set(state.page, pages);
    var start = state.page * PAGE;
    var end = Math.min(visible.length, start + PAGE);
    var rows = [];
    for (var r = start; r < end; r++) {
      var item = visible[r];
      var row = el('tr');
      for (var c = 0; c < cfg.columns.length; c++) {
        var col = cfg.columns[c];
        var td = el('td', { className: col.num ? 'num' : col.text ? 'text' : null });
        append(td, col.cell(item));
        row.appendChild(td);
      }
      rows.push(row);
    }
    if (rows.length === 0) {
      rows.push(el('tr', null, [el('td', { colspan: cfg.columns.length, className: 'muted', text: state.query ? 'Nothing matches this search.' : 'Nothing to list.' })]));
    }
    tbody.replaceChildren.apply(tbody, rows);
    var total = cfg.items.length;
    var msg;
    if (visible.length === 0) msg = state.query ? 'No ' + cfg.noun + ' match \u201c' + input.value.trim() + '\u201d (of ' + count(total) + ').' : 'No ' + cfg.noun + '.';
    else {
      msg = 'Showing ' + count(start + 1) + '\u2013' + count(end) + ' of ' + count(visible.length) + ' ' + cfg.noun;
      if (state.query) msg += ' matching \u201c' + input.value.trim() + '\u201d (of ' + count(total) + ')';
      msg += '.';
    }
    status.textContent = msg;
    table.setAttribute('data-count', String(visible.length));
    heads.forEach(function (h) {
      if (!h.col.sort) return;
      h.th.setAttribute('aria-sort', h.col.key === state.key ? (state.dir > 0 ? 'ascending' : 'descending') : 'none');
    });
  }
  var timer = 0;
  input.addEventListener('input', function () {
    clearTimeout(timer);
    timer = setTimeout(function () {
      state.query = input.value.trim().toLowerCase();
      state.page = 0;
      refilter(); draw();
    }, 120);
  });
  resort(); refilter(); draw();
}

function byFit(a, b) {
  var fa = D.fit[a], fb = D.fit[b];
  return (fa === null ? -Infinity : fa) - (fb === null ? -Infinity : fb) || 0;
}
function docColumns(showGroup) {
  var cols = [
    { key: 'id', title: 'ID', sort: function (a, b) { return collator.compare(D.id[a], D.id[b]); }, cell: function (i) { return el('code', { text: D.id[i] }); } },
    { key: 'title', title: 'Title', text: true, sort: function (a, b) { return collator.compare(D.title[a], D.title[b]); }, cell: function (i) { return docTitle(i); } },
    { key: 'fit', title: 'Fit', num: true, sort: byFit, cell: function (i) { return fixed(D.fit[i], 3); } },
  ];
  if (showGroup) cols.push({ key: 'group', title: 'Group', sort: function (a, b) { return D.group[a] - D.group[b]; }, cell: function (i) { return groupLink(D.group[i]); } });
  if (data.duplicates) cols.push({ key: 'set', title: 'Near-duplicate set', cell: function (i) { return setLink(D.duplicateSet[i]); } });
  return cols;
}

function setHay(s) {
  var parts = [];
  for (var m = 0; m < s.members.length; m++) {
    var id = s.members[m].id;
    var at = indexOfId.get(id);
    parts.push(id, at === undefined ? '' : D.title[at]);
  }
  return parts.join('\n').toLowerCase();
}
function lowestSimilarity(s) {
  var low = Infinity;
  for (var m = 0; m < s.members.length; m++) {
    var mem = s.members[m];
    if (mem.id !== s.representative && mem.similarity !== null && mem.similarity < low) low = mem.similarity;
  }
  return low === Infinity ? null : low;
}
function titleOfId(id) {
  var at = indexOfId.get(id);
  return at === undefined ? id : docTitle(at);
}

function buildMount(mount) {
  var kind = mount.getAttribute('data-table');
  if (kind === 'group') {
    var gid = Number(mount.getAttribute('data-group'));
    makeTable(mount, {
      caption: 'Documents of group ' + gid, noun: 'documents', searchLabel: 'Search this group\u2019s documents (id or title):',
      items: byGroup.get(gid) || [], columns: docColumns(false), hay: docHay, sortKey: 'fit', sortDir: -1,
    });
  } else if (kind === 'all') {
    var all = new Array(n);
    for (var a = 0; a < n; a++) all[a] = a;
    makeTable(mount, {
      caption: 'All documents', noun: 'documents', searchLabel: 'Search all documents (id or title):',
      items: all, columns: docColumns(true), hay: docHay, sortKey: null,
    });
  } else if (kind === 'ungrouped') {
    makeTable(mount, {
      caption: 'Documents in no group', noun: 'documents', searchLabel: 'Search these documents (id or title):',
      items: ungrouped, columns: docColumns(false), hay: docHay, sortKey: null,
    });
  } else if (kind === 'sets') {
    var setHays = new Array(sets.length);
    var idx = [];
    for (var s = 0; s < sets.length; s++) idx.push(s);
    makeTable(mount, {
      caption: 'Near-duplicate sets', noun: 'sets', searchLabel: 'Search sets by a member\u2019s id or title:',
      items: idx,
      hay: function (x) { if (setHays[x] === undefined) setHays[x] = setHay(sets[x]); return setHays[x]; },
      sortKey: null,
      columns: [
        { key: 'set', title: 'Set', sort: function (x, y) { return sets[x].id - sets[y].id; }, cell: function (x) { return el('a', { href: '#set-' + sets[x].id, text: 'Set ' + sets[x].id }); } },
        { key: 'rep', title: 'Representative', text: true, sort: function (x, y) { return collator.compare(titleOfId(sets[x].representative), titleOfId(sets[y].representative)); }, cell: function (x) { return titleOfId(sets[x].representative); } },
        { key: 'size', title: 'Documents', num: true, sort: function (x, y) { return sets[x].members.length - sets[y].members.length; }, cell: function (x) { return count(sets[x].members.length); } },
        { key: 'low', title: 'Lowest similarity', num: true, sort: function (x, y) { var p = lowestSimilarity(sets[x]), q = lowestSimilarity(sets[y]); return (p === null ? -1 : p) - (q === null ? -1 : q); }, cell: function (x) { return fixed(lowestSimilarity(sets[x]), 3); } },
      ],
    });
  }
}
function mountWithin(section) {
  var mounts = section.querySelectorAll('[data-table]');
  for (var m = 0; m < mounts.length; m++) {
    if (mounts[m].hasAttribute('data-ready')) continue;
    mounts[m].setAttribute('data-ready', '');
    buildMount(mounts[m]);
  }
}

// ---- word differences ----
function sameRun(text, first, last, full) {
  if (full) return [text];
  var tokens = text.split(/(\s+)/);
  var words = 0;
  for (var t = 0; t < tokens.length; t++) if (tokens[t] !== '' && !/^\s+$/.test(tokens[t])) words++;
  if (words <= 2 * CONTEXT_WORDS + 8) return [text];
  var headWords = first ? 0 : CONTEXT_WORDS;
  var tailWords = last ? 0 : CONTEXT_WORDS;
  var head = [], tail = [], seen = 0, cut = 0;
  for (var h = 0; h < tokens.length && seen < headWords; h++) { head.push(tokens[h]); if (tokens[h] !== '' && !/^\s+$/.test(tokens[h])) seen++; cut = h + 1; }
  seen = 0;
  var from = tokens.length;
  for (var r = tokens.length - 1; r >= cut && seen < tailWords; r--) { tail.unshift(tokens[r]); if (tokens[r] !== '' && !/^\s+$/.test(tokens[r])) seen++; from = r; }
  var hidden = words - Math.min(headWords, words) - Math.min(tailWords, words);
  var out = [];
  if (head.length) out.push(head.join(''));
  out.push(el('span', { className: 'elided', text: ' [\u2026 ' + count(hidden) + ' unchanged words \u2026] ' }));
  if (tail.length) out.push(tail.join(''));
  return out;
}
function renderDiff(pieces, full) {
  var p = el('p', { className: 'diff' });
  for (var k = 0; k < pieces.length; k++) {
    var kind = pieces[k][0], text = pieces[k][1];
    if (kind === 1) p.appendChild(el('ins', null, [el('span', { className: 'mark', text: '{+' }), text, el('span', { className: 'mark', text: '+}' })]));
    else if (kind === 2) p.appendChild(el('del', null, [el('span', { className: 'mark', text: '[-' }), text, el('span', { className: 'mark', text: '-]' })]));
    else { var parts = sameRun(text, k === 0, k === pieces.length - 1, full); for (var q = 0; q < parts.length; q++) append(p, parts[q]); }
  }
  return p;
}
function renderMember(set, mem) {
  var at = indexOfId.get(mem.id);
  var art = el('article', { className: 'member' });
  art.appendChild(el('h3', { text: titleOfId(mem.id) }));
  var facts = el('p', { className: 'muted' }, ['id ', el('code', { text: mem.id })]);
  if (at !== undefined) { append(facts, ' \u00b7 group '); append(facts, groupLink(D.group[at])); }
  art.appendChild(facts);
  if (mem.id === set.representative) {
    art.appendChild(el('p', { text: 'This is the set\u2019s representative: the other documents are compared with it.' }));
  } else {
    art.appendChild(el('p', { text: 'Similarity to the representative: ' + fixed(mem.similarity, 3) }));
    if (mem.diff && mem.diff.length) {
      var added = 0, removed = 0;
      for (var k = 0; k < mem.diff.length; k++) { if (mem.diff[k][0] === 1) added++; else if (mem.diff[k][0] === 2) removed++; }
      art.appendChild(el('p', { className: 'muted', text: added + removed === 0 ? 'The same words as the representative.' : count(added) + ' added and ' + count(removed) + ' removed passages.' }));
      var full = false;
      var body = renderDiff(mem.diff, full);
      var toggle = el('button', { type: 'button', className: 'toggle', 'aria-expanded': 'false', text: 'Show the full text' });
      toggle.addEventListener('click', function () {
        full = !full;
        var next = renderDiff(mem.diff, full);
        body.replaceWith(next);
        body = next;
        toggle.setAttribute('aria-expanded', full ? 'true' : 'false');
        toggle.textContent = full ? 'Show the changes only' : 'Show the full text';
      });
      if (body.querySelector('.elided')) art.appendChild(toggle);
      art.appendChild(body);
    } else {
      art.appendChild(el('p', { className: 'muted', text: 'No word differences were recorded for this document.' }));
    }
  }
  return art;
}
var setSection = doc.getElementById('duplicate-set');
function renderSet(id) {
  var body = doc.getElementById('duplicate-set-body');
  var heading = doc.getElementById('duplicate-set-h');
  var set = setById.get(id);
  heading.textContent = 'Near-duplicate set ' + id;
  if (!data.duplicates) { body.replaceChildren(el('p', { text: 'Near-duplicates were not searched for in this run.' })); return; }
  if (!set) {
    body.replaceChildren(el('p', { className: 'notice', text: 'There is no near-duplicate set ' + id + ' in this report.' }), el('p', null, [el('a', { href: '#duplicates', text: 'All near-duplicate sets' })]));
    return;
  }
  var summary = el('p', null, [count(set.members.length) + ' documents. Representative: ', el('strong', { text: titleOfId(set.representative) }), ' (', el('code', { text: set.representative }), ').']);
  var legend = el('p', { className: 'legend' }, [
    'How to read the differences: ',
    el('ins', null, [el('span', { className: 'mark', text: '{+' }), 'added', el('span', { className: 'mark', text: '+}' })]),
    ' words are in this document but not in the representative; ',
    el('del', null, [el('span', { className: 'mark', text: '[-' }), 'removed', el('span', { className: 'mark', text: '-]' })]),
    ' words are only in the representative. Long unchanged stretches are shortened.',
  ]);
  var list = el('div', { className: 'members' });
  var pager = makePager('Documents of this set: pages', function (p) { show(p); });
  function show(p) {
    var pages = Math.ceil(set.members.length / MEMBERS_PAGE);
    var page = pager.set(p, pages);
    var items = [];
    for (var m = page * MEMBERS_PAGE; m < Math.min(set.members.length, (page + 1) * MEMBERS_PAGE); m++) items.push(renderMember(set, set.members[m]));
    list.replaceChildren.apply(list, items);
  }
  body.replaceChildren(summary, legend, list, pager.node, el('p', null, [el('a', { href: '#duplicates', text: 'All near-duplicate sets' })]));
  show(0);
}

// ---- routing by hash ----
var views = Array.prototype.slice.call(doc.querySelectorAll('section.view'));
var overview = doc.getElementById('overview');
var notice = doc.getElementById('route-notice');
var navLinks = Array.prototype.slice.call(doc.querySelectorAll('nav.views a'));
function route(moveFocus) {
  var raw = location.hash.slice(1);
  var name = raw;
  try { name = decodeURIComponent(raw); } catch (err) { name = raw; }
  var target = null;
  var scrollTo = null;
  var missing = '';
  var m = /^set-(\d+)$/.exec(name);
  if (m && setSection) { target = setSection; renderSet(Number(m[1])); }
  else if (name) {
    var found = doc.getElementById(name);
    if (found && found.classList.contains('view') && found !== setSection) target = found;
    else if (found && found.closest('section.view')) { target = found.closest('section.view'); scrollTo = found; }
    else if (found) return;
    else missing = name;
  }
  if (!target) target = overview;
  for (var v = 0; v < views.length; v++) views[v].hidden = views[v] !== target;
  notice.hidden = !missing;
  notice.textContent = missing ? 'This report has no view called \u201c' + missing + '\u201d; showing the overview.' : '';
  var navFor = target.getAttribute('data-nav') || target.id;
  for (var l = 0; l < navLinks.length; l++) {
    if (navLinks[l].getAttribute('href') === '#' + navFor) navLinks[l].setAttribute('aria-current', 'page');
    else navLinks[l].removeAttribute('aria-current');
  }
  mountWithin(target);
  var h2 = target.querySelector('h2');
  doc.title = (h2 ? h2.textContent + ' \u2014 ' : '') + baseTitle;
  if (scrollTo) { scrollTo.scrollIntoView(); return; }
  window.scrollTo(0, 0);
  if (moveFocus && h2) h2.focus({ preventScroll: true });
}
window.addEventListener('hashchange', function () { route(true); });
// The skip link moves focus without changing the hash, so back/forward stay between views.
var skip = doc.querySelector('a.skip');
var mainEl = doc.getElementById('main');
if (skip && mainEl) skip.addEventListener('click', function (ev) { ev.preventDefault(); mainEl.focus(); });
route(false);
})();
`;
