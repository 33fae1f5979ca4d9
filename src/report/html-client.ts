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

var COLS = data.columns || { names: [], values: [] };
var TX = data.texts || { chunk: 1000, chunks: 0 };
var MAX_TEXT = 200000;
var textBlocks = new Array(TX.chunks);
// Texts live in their own JSON blocks, parsed the first time one of their documents is opened or searched.
function textBlock(c) {
  if (!textBlocks[c]) {
    var node = doc.getElementById('sheaf-text-' + c);
    var block = null;
    try { block = node ? JSON.parse(node.textContent) : null; } catch (err) { block = null; }
    textBlocks[c] = block && block.original ? block : { original: [], cleaned: [] };
  }
  return textBlocks[c];
}
function docText(i) {
  if (!TX.chunks) return null;
  var t = textBlock(Math.floor(i / TX.chunk)).original[i % TX.chunk];
  return typeof t === 'string' ? t : null;
}
function docCleaned(i) {
  if (!TX.chunks) return null;
  var t = textBlock(Math.floor(i / TX.chunk)).cleaned[i % TX.chunk];
  return typeof t === 'string' ? t : null;
}
var hayCache = new Array(n);
function docHay(i) {
  var h = hayCache[i];
  if (h === undefined) {
    var parts = [D.id[i], D.title[i]];
    for (var c = 0; c < COLS.names.length; c++) parts.push(COLS.values[c][i]);
    var t = docText(i);
    if (t !== null) parts.push(t);
    h = parts.join('\n').toLowerCase();
    hayCache[i] = h;
  }
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
  return el('a', { href: '#group-' + id, className: 'glink' }, [el('span', { className: 'gno', text: String(id) }), el('span', { className: 'gname', text: groupLabel.get(id) })]);
}
function shortText(t, max) {
  t = String(t);
  return t.length > max ? t.slice(0, max - 1) + '\u2026' : t;
}
function docLink(i) {
  return el('a', { href: '#doc-' + i, title: 'Open this document' }, [el('code', { text: D.id[i] })]);
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
  var filters = cfg.filters ? makeFilters(uid, cfg.filters, function () { state.page = 0; refilter(); draw(); }) : null;
  var wrap = el('div', { className: 'table-wrap' }, [table]);
  if (filters) mount.replaceChildren(tools, filters.node, wrap, pager.node);
  else mount.replaceChildren(tools, wrap, pager.node);

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
    var pass = filters ? filters.predicate() : null;
    if (!q && !pass) { visible = sorted; return; }
    var out = [];
    for (var r = 0; r < sorted.length; r++) {
      var it = sorted[r];
      if (pass && !pass(it)) continue;
      if (q && cfg.hay(it).indexOf(q) < 0) continue;
      out.push(it);
    }
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
        var td = el('td', { className: col.cls || (col.num ? 'num' : col.text ? 'text' : null), 'data-label': col.title });
        append(td, col.cell(item));
        row.appendChild(td);
      }
      rows.push(row);
    }
    if (rows.length === 0) {
      rows.push(el('tr', null, [el('td', { colspan: cfg.columns.length, className: 'muted', text: state.query || (filters && filters.active()) ? 'Nothing matches this search and these filters.' : 'Nothing to list.' })]));
    }
    tbody.replaceChildren.apply(tbody, rows);
    var total = cfg.items.length;
    var msg;
    var narrowed = state.query || (filters && filters.active());
    if (visible.length === 0) msg = narrowed ? 'No ' + cfg.noun + ' match \u201c' + input.value.trim() + '\u201d (of ' + count(total) + ').' : 'No ' + cfg.noun + '.';
    else {
      msg = 'Showing ' + count(start + 1) + '\u2013' + count(end) + ' of ' + count(visible.length) + ' ' + cfg.noun;
      if (state.query) msg += ' matching \u201c' + input.value.trim() + '\u201d';
      if (filters && filters.active()) msg += ' passing the filters';
      if (narrowed) msg += ' (of ' + count(total) + ')';
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
  table.__sheafFilters = filters;
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
var hasGroups = data.groups.id.length > 0;
function docColumns(showGroup) {
  var cols = [
    { key: 'id', title: 'ID', sort: function (a, b) { return collator.compare(D.id[a], D.id[b]); }, cell: docLink },
    { key: 'title', title: 'Title', text: true, sort: function (a, b) { return collator.compare(D.title[a], D.title[b]); }, cell: function (i) { return docTitle(i); } },
  ];
  if (hasGroups) cols.push({ key: 'fit', title: 'Fit', num: true, sort: byFit, cell: function (i) { return fixed(D.fit[i], 3); } });
  if (showGroup && hasGroups) cols.push({ key: 'group', title: 'Group', sort: function (a, b) { return D.group[a] - D.group[b]; }, cell: function (i) { return groupLink(D.group[i]); } });
  if (hasGroups) cols.push({ key: 'margin', title: 'Margin', num: true, sort: function (a, b) { var x = D.margin[a], y = D.margin[b]; return (x === null ? Infinity : x) - (y === null ? Infinity : y) || 0; }, cell: function (i) { return fixed(D.margin[i], 3); } });
  if (data.duplicates) cols.push({ key: 'set', title: 'Near-duplicate set', cell: function (i) { return setLink(D.duplicateSet[i]); } });
  COLS.names.forEach(function (name, c) {
    var values = COLS.values[c];
    cols.push({ key: 'col-' + c, title: name, text: true, cls: 'col', sort: function (a, b) { return collator.compare(values[a], values[b]); }, cell: function (i) { var v = values[i]; return v.length > 40 ? el('span', { title: shortText(v, 400), text: shortText(v, 40) }) : v; } });
  });
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
      caption: 'Documents of group ' + gid, noun: 'documents', searchLabel: 'Search this group\u2019s documents (id, title, columns, text):',
      items: byGroup.get(gid) || [], columns: docColumns(false), hay: docHay, sortKey: 'fit', sortDir: -1, filters: { group: false },
    });
  } else if (kind === 'all') {
    var all = new Array(n);
    for (var a = 0; a < n; a++) all[a] = a;
    makeTable(mount, {
      caption: 'All documents', noun: 'documents', searchLabel: 'Search all documents (id, title, columns, text):',
      items: all, columns: docColumns(true), hay: docHay, sortKey: null, filters: { group: hasGroups },
    });
  } else if (kind === 'ungrouped') {
    makeTable(mount, {
      caption: 'Documents in no group', noun: 'documents', searchLabel: 'Search these documents (id, title, columns, text):',
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
  var cuts = section.querySelectorAll('[data-cut]');
  for (var ci = 0; ci < cuts.length; ci++) {
    if (cuts[ci].hasAttribute('data-ready')) continue;
    cuts[ci].setAttribute('data-ready', '');
    buildCut(cuts[ci]);
  }
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
    if (kind === 1) p.appendChild(el('ins', { title: 'only in this document' }, [text]));
    else if (kind === 2) p.appendChild(el('del', { title: 'only in the representative' }, [text]));
    else { var parts = sameRun(text, k === 0, k === pieces.length - 1, full); for (var q = 0; q < parts.length; q++) append(p, parts[q]); }
  }
  return p;
}
function renderMember(set, mem) {
  var at = indexOfId.get(mem.id);
  var art = el('article', { className: 'member' });
  art.appendChild(el('h3', null, [at === undefined ? titleOfId(mem.id) : el('a', { href: '#doc-' + at, text: titleOfId(mem.id) })]));
  var facts = el('p', { className: 'muted' }, ['id ', el('code', { text: mem.id })]);
  if (at !== undefined && hasGroups) { append(facts, ' \u00b7 group '); append(facts, groupLink(D.group[at])); }
  if (at !== undefined && TX.chunks) { append(facts, ' \u00b7 '); append(facts, el('a', { href: '#doc-' + at, text: 'read the text' })); }
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
    el('ins', null, ['added']),
    ' words are in this document but not in the representative; ',
    el('del', null, ['removed']),
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


// ---- filters of a document table ----
var filterCount = 0;
function makeFilters(uid, opts, onChange) {
  var fid = uid + '-f';
  var boxes = [];
  function field(labelText, control) {
    var id = fid + '-' + (++filterCount);
    control.id = id;
    var wrap = el('div', { className: 'filter' }, [el('label', { for: id, text: labelText }), control]);
    boxes.push(wrap);
    return control;
  }
  var groupSel = null;
  if (opts.group) {
    groupSel = el('select');
    groupSel.appendChild(el('option', { value: 'any', text: 'any' }));
    for (var g = 0; g < data.groups.id.length; g++) groupSel.appendChild(el('option', { value: 'g' + data.groups.id[g], text: data.groups.id[g] + ': ' + shortText(data.groups.label[g], 40) }));
    groupSel.appendChild(el('option', { value: 'unsorted', text: 'unsorted (fit no group well)' }));
    groupSel.appendChild(el('option', { value: 'none', text: 'no usable terms' }));
    groupSel.appendChild(el('option', { value: 'cut', text: 'a merged group (chosen in the tree)', hidden: true }));
    field('Group', groupSel);
  }
  var fitLo = hasGroups ? field('Fit from', el('input', { type: 'number', step: '0.01', min: '-1', max: '1', inputmode: 'decimal', className: 'short' })) : null;
  var fitHi = hasGroups ? field('to', el('input', { type: 'number', step: '0.01', min: '-1', max: '1', inputmode: 'decimal', className: 'short' })) : null;
  var setSel = null;
  if (data.duplicates) {
    setSel = el('select');
    setSel.appendChild(el('option', { value: 'any', text: 'any' }));
    setSel.appendChild(el('option', { value: 'in', text: 'in a near-duplicate set' }));
    setSel.appendChild(el('option', { value: 'out', text: 'in no set' }));
    for (var s = 0; s < Math.min(sets.length, 500); s++) setSel.appendChild(el('option', { value: 's' + sets[s].id, text: 'set ' + sets[s].id }));
    field('Near-copies', setSel);
  }
  var colSel = null, colVal = null;
  if (COLS.names.length) {
    colSel = el('select');
    colSel.appendChild(el('option', { value: '', text: '(choose a column)' }));
    COLS.names.forEach(function (name, c) { colSel.appendChild(el('option', { value: String(c), text: shortText(name, 40) })); });
    field('Column', colSel);
    var listId = fid + '-values';
    colVal = field('contains', el('input', { type: 'text', autocomplete: 'off', spellcheck: 'false', list: listId }));
    var datalist = el('datalist', { id: listId });
    boxes.push(datalist);
    colSel.addEventListener('change', function () {
      var c = Number(colSel.value);
      var seen = new Map();
      if (colSel.value !== '') {
        var vals = COLS.values[c];
        for (var i = 0; i < vals.length && seen.size <= 200; i++) if (vals[i] !== '' && vals[i].length <= 80) seen.set(vals[i], true);
      }
      var opts2 = [];
      if (seen.size <= 200) seen.forEach(function (_, v) { opts2.push(el('option', { value: v })); });
      datalist.replaceChildren.apply(datalist, opts2);
    });
  }
  var reset = el('button', { type: 'button', className: 'toggle', text: 'Clear filters' });
  var cutGroups = null;
  var node = el('fieldset', { className: 'filters' }, [el('legend', { text: 'Filters' })].concat(boxes, [reset]));
  var timer = 0;
  function changed() { clearTimeout(timer); timer = setTimeout(onChange, 120); }
  node.addEventListener('input', changed);
  node.addEventListener('change', changed);
  reset.addEventListener('click', function () {
    if (groupSel) groupSel.value = 'any';
    if (fitLo) { fitLo.value = ''; fitHi.value = ''; }
    if (setSel) setSel.value = 'any';
    if (colSel) { colSel.value = ''; colVal.value = ''; }
    onChange();
  });
  function num(input) { if (!input) return null; var v = input.value.trim(); return v === '' || !isFinite(Number(v)) ? null : Number(v); }
  return {
    node: node,
    setCut: function (groups) {
      cutGroups = new Set(groups);
      if (!groupSel) return;
      var opt = groupSel.querySelector('option[value="cut"]');
      opt.hidden = false;
      opt.textContent = 'groups ' + groups.join(', ') + ' (merged in the tree)';
      groupSel.value = 'cut';
      onChange();
    },
    active: function () { return this.predicate() !== null; },
    predicate: function () {
      var tests = [];
      var gv = groupSel ? groupSel.value : 'any';
      if (gv === 'unsorted') tests.push(function (i) { return D.group[i] < 0 && D.fit[i] !== null; });
      else if (gv === 'none') tests.push(function (i) { return D.group[i] < 0 && D.fit[i] === null; });
      else if (gv === 'cut' && cutGroups) tests.push(function (i) { return cutGroups.has(D.group[i]); });
      else if (gv.charAt(0) === 'g') { var gid = Number(gv.slice(1)); tests.push(function (i) { return D.group[i] === gid; }); }
      var lo = num(fitLo), hi = num(fitHi);
      if (lo !== null) tests.push(function (i) { return D.fit[i] !== null && D.fit[i] >= lo; });
      if (hi !== null) tests.push(function (i) { return D.fit[i] !== null && D.fit[i] <= hi; });
      var sv = setSel ? setSel.value : 'any';
      if (sv === 'in') tests.push(function (i) { return D.duplicateSet[i] >= 0; });
      else if (sv === 'out') tests.push(function (i) { return D.duplicateSet[i] < 0; });
      else if (sv.charAt(0) === 's') { var sid = Number(sv.slice(1)); tests.push(function (i) { return D.duplicateSet[i] === sid; }); }
      if (colSel && colSel.value !== '' && colVal.value.trim() !== '') {
        var vals = COLS.values[Number(colSel.value)];
        var want = colVal.value.trim().toLowerCase();
        tests.push(function (i) { return vals[i].toLowerCase().indexOf(want) >= 0; });
      }
      if (!tests.length) return null;
      return function (i) { for (var t = 0; t < tests.length; t++) if (!tests[t](i)) return false; return true; };
    },
  };
}

// ---- coarser / finer: cut the tree at any number of groups ----
function buildCut(mount) {
  var k = data.groups.id.length;
  var M = data.merges || [];
  if (!M.length || k < 2) { mount.replaceChildren(el('p', { text: 'The tree has no merges to cut.' })); return; }
  var uid = 'cut-' + (++tableCount);
  var slider = el('input', { type: 'range', id: uid, min: '1', max: String(k), step: '1', value: String(Math.max(1, Math.ceil(k / 2))) });
  var out = el('output', { for: uid });
  var fewer = el('button', { type: 'button', className: 'toggle', text: 'Coarser' });
  var more = el('button', { type: 'button', className: 'toggle', text: 'Finer' });
  var tbody = el('tbody');
  var table = el('table', { className: 'rows cut-table' }, [
    el('caption', { className: 'visually-hidden', text: 'Groups after cutting the tree' }),
    el('thead', null, [el('tr', null, [el('th', { scope: 'col', text: 'Name' }), el('th', { scope: 'col', className: 'num', text: 'Documents' }), el('th', { scope: 'col', text: 'Groups it holds' }), el('th', { scope: 'col', text: '' })])]),
    tbody,
  ]);
  mount.replaceChildren(el('div', { className: 'tools' }, [el('label', { for: uid, text: 'Number of groups: ' }), fewer, slider, more, out]), el('div', { className: 'table-wrap' }, [table]));
  function draw() {
    var level = Math.min(k, Math.max(1, Number(slider.value) || k));
    var steps = Math.min(M.length, k - level);
    var members = [];
    var alive = new Set();
    for (var v = 0; v < k; v++) { members[v] = [v]; alive.add(v); }
    for (var i = 0; i < steps; i++) {
      var mg = M[i];
      members[k + i] = (members[mg.left] || []).concat(members[mg.right] || []);
      alive.delete(mg.left); alive.delete(mg.right); alive.add(k + i);
    }
    var nodes = [];
    alive.forEach(function (node) {
      var size = 0;
      members[node].forEach(function (p) { size += data.groups.size[p] || 0; });
      nodes.push({ node: node, size: size });
    });
    nodes.sort(function (a, b) { return b.size - a.size || a.node - b.node; });
    out.textContent = count(nodes.length) + ' groups';
    slider.setAttribute('aria-valuetext', nodes.length + ' groups');
    var rows = nodes.map(function (x) {
      var merged = x.node >= k;
      var name = merged ? M[x.node - k].name : data.groups.label[x.node];
      var ids = members[x.node].map(function (p) { return data.groups.id[p]; }).sort(function (a, b) { return a - b; });
      var holds = el('span', { className: 'holds' });
      ids.forEach(function (id) { holds.appendChild(groupLink(id)); });
      var list = el('button', { type: 'button', className: 'toggle', text: 'List documents' });
      list.addEventListener('click', function () { pendingCut = ids; location.hash = '#documents'; applyPendingCut(); });
      return el('tr', { 'data-groups': ids.join(' ') }, [
        el('td', { className: 'text', 'data-label': 'Name' }, [merged ? el('strong', { text: name }) : name, merged ? el('span', { className: 'muted', text: ' (merged)' }) : null]),
        el('td', { className: 'num', 'data-label': 'Documents', text: count(x.size) }),
        el('td', { 'data-label': 'Groups it holds' }, [holds]),
        el('td', { 'data-label': '' }, [list]),
      ]);
    });
    tbody.replaceChildren.apply(tbody, rows);
  }
  slider.addEventListener('input', draw);
  fewer.addEventListener('click', function () { slider.value = String(Math.max(1, Number(slider.value) - 1)); draw(); });
  more.addEventListener('click', function () { slider.value = String(Math.min(k, Number(slider.value) + 1)); draw(); });
  draw();
}
var pendingCut = null;
function applyPendingCut() {
  if (!pendingCut) return;
  var section = doc.getElementById('documents');
  if (section.hidden) return;
  var table = section.querySelector('table.rows');
  if (!table || !table.__sheafFilters) return;
  table.__sheafFilters.setCut(pendingCut);
  pendingCut = null;
}

// ---- similarity graph threshold ----
var simInput = doc.getElementById('sim-threshold');
if (simInput) {
  var simEdges = Array.prototype.slice.call(doc.querySelectorAll('line.sim-edge'));
  var simOut = doc.getElementById('sim-value');
  var simCount = doc.getElementById('sim-count');
  var simDraw = function () {
    var t = Number(simInput.value);
    var shown = 0;
    for (var e2 = 0; e2 < simEdges.length; e2++) {
      if (Number(simEdges[e2].getAttribute('data-s')) >= t) { simEdges[e2].removeAttribute('visibility'); shown++; }
      else simEdges[e2].setAttribute('visibility', 'hidden');
    }
    simOut.textContent = fixed(t, 2);
    simCount.textContent = count(shown) + (shown === 1 ? ' line' : ' lines');
  };
  simInput.addEventListener('input', simDraw);
  simDraw();
}

// ---- document reader ----
var docSection = doc.getElementById('document');
var termRes = new Map();
function termRegex(gid) {
  if (termRes.has(gid)) return termRes.get(gid);
  var at = data.groups.id.indexOf(gid);
  var terms = at >= 0 ? data.groups.terms[at].slice() : [];
  terms = terms.filter(function (t) { return t.length > 0; }).sort(function (a, b) { return b.length - a.length; });
  var re = null;
  if (terms.length) {
    var alts = terms.map(function (t) { return t.replace(/[.*+?^$(){}|[\]\\]/g, '\\$&').replace(/\s+/g, '\\s+'); });
    try { re = new RegExp('(?<![\\p{L}\\p{N}])(?:' + alts.join('|') + ')[\\p{L}]*', 'giu'); } catch (err) { re = null; }
  }
  termRes.set(gid, re);
  return re;
}
function marked(text, gid) {
  var box = el('div', { className: 'doc-text' });
  var cut = text.length > MAX_TEXT;
  if (cut) text = text.slice(0, MAX_TEXT);
  var re = termRegex(gid);
  if (!re) { box.textContent = text; }
  else {
    re.lastIndex = 0;
    var last = 0, hit, marks = 0;
    while ((hit = re.exec(text)) !== null) {
      if (hit[0] === '') { re.lastIndex++; continue; }
      if (hit.index > last) box.appendChild(doc.createTextNode(text.slice(last, hit.index)));
      box.appendChild(el('mark', { text: hit[0] }));
      marks++;
      last = hit.index + hit[0].length;
    }
    if (last < text.length) box.appendChild(doc.createTextNode(text.slice(last)));
    box.setAttribute('data-marks', String(marks));
  }
  if (cut) box.appendChild(el('p', { className: 'muted', text: '[The text goes on; the first ' + count(MAX_TEXT) + ' characters are shown.]' }));
  return box;
}
function safeLink(href) {
  // Links are written by sheaf (percent-encoded relative paths or file: URLs); anything else is not made a link.
  if (typeof href !== 'string' || href === '') return null;
  if (/^file:\/\//i.test(href)) return href;
  if (/^[a-z][a-z0-9+.-]*:/i.test(href) || /^\/\//.test(href)) return null;
  return href;
}
function fact(dl, name, value) {
  dl.appendChild(el('div', null, [el('dt', { text: name }), el('dd', null, [value])]));
}
function renderDocument(i) {
  var body = doc.getElementById('document-body');
  var heading = doc.getElementById('document-h');
  if (!(i >= 0 && i < n)) {
    heading.textContent = 'Document';
    body.replaceChildren(el('p', { className: 'notice', text: 'There is no document ' + i + ' in this report.' }));
    return;
  }
  heading.textContent = docTitle(i);
  var dl = el('dl', { className: 'doc-facts' });
  fact(dl, 'ID', el('code', { text: D.id[i] }));
  if (hasGroups) fact(dl, 'Group', D.group[i] >= 0 ? groupLink(D.group[i]) : el('span', { text: D.fit[i] !== null ? 'unsorted (fits no group well)' : 'none (no usable terms)' }));
  if (hasGroups) fact(dl, 'Fit', el('span', { text: fixed(D.fit[i], 3) + ' (cosine to the group\u2019s centre)' }));
  if (D.next[i] >= 0) {
    fact(dl, 'Next closest group', groupLink(D.next[i]));
    fact(dl, 'Margin', el('span', { text: fixed(D.margin[i], 3) + (D.margin[i] !== null && D.margin[i] < 0.05 ? ' \u2014 close to both groups' : ' (fit minus the cosine to the next group)') }));
  }
  var href = safeLink(D.link[i]);
  if (href) fact(dl, 'File', el('a', { href: href, text: D.link[i], rel: 'noopener noreferrer' }));
  if (data.trends && D.period[i] >= 0) fact(dl, 'Period', el('span', { text: data.trends.periods[D.period[i]] }));
  var parts = [dl];
  if (COLS.names.length) {
    var cols = el('dl', { className: 'doc-columns' });
    COLS.names.forEach(function (name, c) {
      var v = COLS.values[c][i];
      if (v !== '') fact(cols, name, el('span', { text: shortText(v, 2000) }));
    });
    parts.push(el('h3', { text: 'Columns of the export' }), cols);
  }
  var sid = D.duplicateSet[i];
  if (sid >= 0 && setById.has(sid)) {
    var set = setById.get(sid);
    var ul = el('ul', { className: 'near' });
    set.members.forEach(function (mem) {
      if (mem.id === D.id[i]) return;
      var at = indexOfId.get(mem.id);
      ul.appendChild(el('li', null, [at === undefined ? el('code', { text: mem.id }) : el('a', { href: '#doc-' + at, text: titleOfId(mem.id) }), el('span', { className: 'muted', text: mem.id === set.representative ? ' (representative)' : ' \u00b7 similarity ' + fixed(mem.similarity, 3) + ' to the representative' })]));
    });
    parts.push(el('h3', { text: 'Near-copies' }), el('p', null, ['In ', setLink(sid), ' with ' + count(set.members.length - 1) + ' other document(s):']), ul);
  }
  parts.push(el('h3', { text: 'Text' }));
  var original = docText(i);
  if (original === null) parts.push(el('p', { className: 'muted', text: 'This report holds no texts.' }));
  else {
    var cleaned = docCleaned(i);
    var textBox = el('div');
    var showWritten = el('button', { type: 'button', className: 'toggle', 'aria-pressed': 'true', text: 'As written' });
    var showCleaned = el('button', { type: 'button', className: 'toggle', 'aria-pressed': 'false', text: 'As analysed (cleaned)' });
    var choose = function (clean) {
      showWritten.setAttribute('aria-pressed', clean ? 'false' : 'true');
      showCleaned.setAttribute('aria-pressed', clean ? 'true' : 'false');
      textBox.replaceChildren(marked(clean ? cleaned : original, D.group[i] >= 0 ? D.group[i] : D.next[i]));
    };
    showWritten.addEventListener('click', function () { choose(false); });
    showCleaned.addEventListener('click', function () { choose(true); });
    if (cleaned !== null) parts.push(el('div', { className: 'tools' }, [showWritten, showCleaned]));
    else parts.push(el('p', { className: 'muted', text: 'Cleaning left this text as written.' }));
    parts.push(el('p', { className: 'legend' }, ['Terms that name the group are ', el('mark', { text: 'marked' }), '.']));
    parts.push(textBox);
    choose(false);
  }
  var nav = el('nav', { className: 'step-nav', 'aria-label': 'Other documents' });
  if (i > 0) nav.appendChild(el('a', { href: '#doc-' + (i - 1), text: '\u2190 previous document' }));
  nav.appendChild(el('a', { href: '#documents', text: 'All documents' }));
  if (i < n - 1) nav.appendChild(el('a', { href: '#doc-' + (i + 1), text: 'next document \u2192' }));
  parts.push(nav);
  body.replaceChildren.apply(body, parts);
}

// ---- routing by hash ----
var views = Array.prototype.slice.call(doc.querySelectorAll('section.view'));
var overview = doc.getElementById('overview') || doc.getElementById('duplicates');
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
  var md = /^doc-(\d+)$/.exec(name);
  if (m && setSection) { target = setSection; renderSet(Number(m[1])); }
  else if (md && docSection) { target = docSection; renderDocument(Number(md[1])); }
  else if (name) {
    var found = doc.getElementById(name);
    if (found && found.classList.contains('view') && found !== setSection && found !== docSection) target = found;
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
  applyPendingCut();
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
