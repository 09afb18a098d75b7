// The qpoint explorer's page: one slider and one typed box per value,
// every move sent to the server on this computer, every answer drawn.
// Nothing is fetched from anywhere else; figures arrive as SVG text and
// are shown through blob: URLs made here.
'use strict';

const $ = (id) => document.getElementById(id);

const state = {
  setup: null,
  values: {},      // control name -> text
  controls: {},    // control name -> {ctl, slider, box, msg}
  diode: 0,
  redraws: 0,
  inflight: null,  // {ctrl, t0, seq}
  pending: false,
  seq: 0,
  shown: 0,
  urls: {},        // figure id -> blob URL in use
  checking: null,  // AbortController of a running check
  refines: 0,      // moves sent in a row only to refine the validity limit
};

// A move waiting longer than this behind one still being answered
// cancels that one: the newest values win.
const STALE_MS = 150;

const PREFIXES = [[-15, 'f'], [-12, 'p'], [-9, 'n'], [-6, 'u'], [-3, 'm'], [0, ''], [3, 'k'], [6, 'M'], [9, 'G'], [12, 'T']];

// eng writes v with digits significant digits and an SI prefix, as the
// circuit file reads it: 220k, 2.2p, 1.05.
function eng(v, digits) {
  if (v === 0 || !isFinite(v)) return '0';
  const r = Number(v.toPrecision(digits));
  let e3 = Math.floor(Math.log10(Math.abs(r)) / 3) * 3;
  e3 = Math.max(-15, Math.min(12, e3));
  const p = PREFIXES.find((x) => x[0] === e3)[1];
  const m = Number((r / Math.pow(10, e3)).toPrecision(digits));
  return String(m) + p;
}

function textOf(ctl, v) {
  if (ctl.decimals > 0) return v.toFixed(ctl.decimals) + ctl.suffix;
  if (ctl.plain && Math.abs(v) >= 1e-3 && Math.abs(v) < 1e5) return String(Number(v.toPrecision(ctl.digits || 4))) + ctl.suffix;
  return eng(v, ctl.digits || 4) + ctl.suffix;
}

// Slider positions run 0..1000 over [min, max], logarithmic where the
// quantity spans decades.
const STEPS = 1000;
function valueAt(ctl, pos) {
  const u = pos / STEPS;
  if (ctl.log) return ctl.min * Math.pow(ctl.max / ctl.min, u);
  return ctl.min + (ctl.max - ctl.min) * u;
}
function positionOf(ctl, v) {
  let u;
  if (ctl.log) u = v > 0 ? Math.log(v / ctl.min) / Math.log(ctl.max / ctl.min) : 0;
  else u = (v - ctl.min) / (ctl.max - ctl.min);
  return Math.round(Math.max(0, Math.min(1, u)) * STEPS);
}

function el(tag, cls, text) {
  const e = document.createElement(tag);
  if (cls) e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}

function buildControls(setup) {
  const aside = $('controls');
  aside.textContent = '';
  let group = null, box = null, index = 0;
  for (const ctl of setup.controls) {
    if (ctl.group !== group) {
      group = ctl.group;
      box = el('details');
      box.open = index === 0 || window.innerWidth > 760;
      box.appendChild(el('summary', '', group));
      aside.appendChild(box);
    }
    const id = 'c' + index++;
    const row = el('div', 'control');
    row.dataset.name = ctl.name;
    const label = el('label');
    label.htmlFor = id;
    label.appendChild(document.createTextNode(ctl.label + ' '));
    if (ctl.unit) label.appendChild(el('span', 'unit', '(' + ctl.unit + ')'));
    const slider = el('input');
    slider.type = 'range';
    slider.id = id;
    slider.min = 0;
    slider.max = STEPS;
    slider.step = 1;
    slider.value = positionOf(ctl, ctl.value);
    const typed = el('input');
    typed.type = 'text';
    typed.value = ctl.text;
    typed.spellcheck = false;
    typed.autocomplete = 'off';
    typed.setAttribute('aria-label', ctl.label + ' value');
    typed.dataset.name = ctl.name;
    const reset = el('button', '', '↺');
    reset.type = 'button';
    reset.title = "back to the file's value";
    reset.setAttribute('aria-label', 'reset ' + ctl.label);
    const msg = el('p', 'msg');
    msg.hidden = true;
    row.append(label, slider, typed, reset, msg);
    box.appendChild(row);
    state.values[ctl.name] = ctl.text;
    state.controls[ctl.name] = { ctl, slider, typed, msg };

    slider.addEventListener('input', () => {
      const text = textOf(ctl, valueAt(ctl, Number(slider.value)));
      typed.value = text;
      state.values[ctl.name] = text;
      schedule();
    });
    typed.addEventListener('change', () => {
      state.values[ctl.name] = typed.value.trim();
      schedule();
    });
    typed.addEventListener('keydown', (e) => {
      if (e.key === 'Enter') {
        state.values[ctl.name] = typed.value.trim();
        schedule();
      }
    });
    reset.addEventListener('click', () => {
      const text = textOf(ctl, ctl.fileValue);
      typed.value = text;
      slider.value = positionOf(ctl, ctl.fileValue);
      state.values[ctl.name] = text;
      schedule();
    });
  }
}

function request() {
  return JSON.stringify({ values: state.values, diode: state.diode });
}

function schedule() {
  state.refines = 0;
  state.pending = true;
  settled();
  pump();
}

// settled marks on the page whether what it shows answers the values as
// they stand (no move waiting or under way), for anyone watching it.
function settled() {
  const current = !state.pending && !state.inflight && state.shown === state.seq;
  document.body.dataset.current = current ? '1' : '0';
}

function pump() {
  if (!state.pending) return;
  if (state.inflight) {
    const waited = performance.now() - state.inflight.t0;
    if (waited < STALE_MS) {
      setTimeout(pump, STALE_MS - waited + 1);
      return;
    }
    state.inflight.ctrl.abort();
    state.inflight = null;
  }
  state.pending = false;
  send();
}

async function send() {
  const ctrl = new AbortController();
  const seq = ++state.seq;
  state.inflight = { ctrl, t0: performance.now(), seq };
  const t0 = performance.now();
  try {
    const r = await fetch('/api/move', { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: request(), signal: ctrl.signal });
    const v = await r.json();
    if (r.status === 409 || v.stale) return;
    if (!r.ok) throw new Error(v.error || r.statusText);
    if (seq > state.shown) {
      state.shown = seq;
      render(v, performance.now() - t0);
      // The validity limit came as a bracket: ask again at the same
      // values (a few times at most), unless newer values are on the way.
      if (v.refine && !state.pending && state.refines < 3) {
        state.refines++;
        state.pending = true;
      }
    }
  } catch (e) {
    if (e.name !== 'AbortError') problems(['The server did not answer: ' + e.message]);
  } finally {
    if (state.inflight && state.inflight.seq === seq) state.inflight = null;
    if (seq > state.shown && !state.inflight && !state.pending) state.shown = seq; // a stale or failed answer: nothing newer is coming
    pump();
    settled();
  }
}

function problems(lines, cautions) {
  const box = $('problems');
  box.textContent = '';
  for (const l of lines || []) box.appendChild(el('p', '', l));
  for (const l of cautions || []) box.appendChild(el('p', 'caution', 'Caution: ' + l));
  box.hidden = box.childElementCount === 0;
}

function showFigure(id, svg) {
  const img = $('fig-' + id) || addCheckFigure(id);
  const url = URL.createObjectURL(new Blob([svg], { type: 'image/svg+xml' }));
  const old = state.urls[id];
  img.onload = () => { if (old) URL.revokeObjectURL(old); };
  img.src = url;
  state.urls[id] = url;
}

function addCheckFigure(id) {
  const fig = el('figure', 'panel');
  const img = el('img');
  img.id = 'fig-' + id;
  img.alt = id.replace('-', ' ') + ' figure';
  fig.appendChild(img);
  $('check-figures').appendChild(fig);
  return img;
}

function tableElement(t) {
  const box = el('div', 'tablebox');
  const tab = el('table');
  tab.id = 'table-' + t.id;
  if (t.caption) tab.appendChild(el('caption', '', t.caption));
  const head = el('tr');
  t.header.forEach((h, i) => head.appendChild(el('th', i > 0 ? 'num' : '', h)));
  tab.appendChild(el('thead')).appendChild(head);
  const body = el('tbody');
  for (const row of t.rows) {
    const tr = el('tr');
    row.forEach((c, i) => {
      const td = el('td', i > 0 ? 'num' : '', c);
      if (i > 0) td.dataset.column = t.header[i];
      tr.appendChild(td);
    });
    tr.dataset.row = row[0];
    body.appendChild(tr);
  }
  tab.appendChild(body);
  box.appendChild(tab);
  return box;
}

function cardsInto(box, cards) {
  box.textContent = '';
  for (const c of cards || []) {
    const d = el('div', 'card');
    d.append(el('div', 'label', c.label), el('div', 'value', c.value), el('div', 'detail', c.detail));
    box.appendChild(d);
  }
}

function listInto(box, items) {
  box.textContent = '';
  for (const n of items || []) box.appendChild(el('li', '', n));
}

const TABLE_ORDER = ['qpoints', 'estimate', 'detector', 'nodes', 'sources'];

// render draws a move's answer: the panels, or the reasons there are
// none (a refused value, a failed analysis), and counts the redraw.
function render(v, ms) {
  draw(v, ms);
  state.redraws++;
  document.body.dataset.redraws = String(state.redraws);
}

function draw(v, ms) {
  const panels = $('panels');
  for (const name in state.controls) {
    const c = state.controls[name];
    const bad = v.errors && v.errors[name];
    c.msg.hidden = !bad;
    c.msg.textContent = bad || '';
    c.typed.setAttribute('aria-invalid', bad ? 'true' : 'false');
  }
  if (v.errors) {
    const other = Object.keys(v.errors).filter((k) => !state.controls[k]).map((k) => k + ': ' + v.errors[k]);
    problems(['Not analysed: a value is refused (see the values marked).'].concat(other));
    panels.classList.add('stale');
    $('status').textContent = 'Not analysed: a value is refused.';
    return;
  }
  if (v.failure) {
    problems(['The analysis failed at these values: ' + v.failure]);
    panels.classList.add('stale');
    $('status').textContent = 'The analysis failed at these values.';
    return;
  }
  panels.classList.remove('stale');
  problems([], v.cautions);
  for (const name in v.resolved || {}) {
    const c = state.controls[name];
    if (c && document.activeElement !== c.slider) c.slider.value = positionOf(c.ctl, v.resolved[name]);
  }
  cardsInto($('cards'), v.cards);
  const drawn = new Set((v.figures || []).map((f) => f.id));
  for (const id of ['operating', 'match', 'smith']) $('fig-' + id).closest('figure').hidden = !drawn.has(id);
  for (const f of v.figures || []) showFigure(f.id, f.svg);
  const tables = $('tables');
  tables.textContent = '';
  const sorted = (v.tables || []).slice().sort((a, b) => TABLE_ORDER.indexOf(a.id) - TABLE_ORDER.indexOf(b.id));
  for (const t of sorted) tables.appendChild(tableElement(t));
  listInto($('notes'), v.notes);
  const s = state.setup;
  $('subtitle').textContent = s.file + (v.set ? ' · values set: ' + v.set : ' · the file\'s values');
  const t = v.timing;
  $('status').textContent = `server ${t.totalMs.toFixed(1)} ms (bias ${t.biasMs.toFixed(2)} ms, ${t.newton} Newton iterations by ${t.strategy}; ` +
    `response ${t.responseMs.toFixed(1)} ms; distortion ${t.distortionMs.toFixed(1)} ms, ${t.waveformSolves} waveform solves` +
    (t.detectorMs > 0 ? `; detector ${t.detectorMs.toFixed(1)} ms` : '') + `) · round trip ${ms.toFixed(0)} ms`;
}

async function post(path, button) {
  const label = button.textContent;
  button.disabled = true;
  button.textContent = 'Writing…';
  try {
    const r = await fetch(path, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: request() });
    const v = await r.json();
    if (!r.ok) throw new Error(v.error || r.statusText);
    $('status').textContent = 'Written to ' + v.written;
  } catch (e) {
    problems(['Not written: ' + e.message]);
  } finally {
    button.disabled = false;
    button.textContent = label;
  }
}

async function check() {
  if (state.checking) state.checking.abort();
  const ctrl = new AbortController();
  state.checking = ctrl;
  const panel = $('check-panel');
  panel.hidden = false;
  const bar = $('check-progress');
  const status = $('check-status');
  bar.removeAttribute('value');
  status.textContent = 'solving the waveform…';
  for (const id of ['check-cards', 'check-figures', 'check-tables', 'check-notes']) $(id).textContent = '';
  for (const id in state.urls) {
    if (!$('fig-' + id)) {
      URL.revokeObjectURL(state.urls[id]);
      delete state.urls[id];
    }
  }
  try {
    const r = await fetch('/api/check', { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: request(), signal: ctrl.signal });
    if (!r.ok) throw new Error((await r.json()).error || r.statusText);
    const reader = r.body.getReader();
    const dec = new TextDecoder();
    let buf = '';
    for (;;) {
      const { value, done } = await reader.read();
      if (done) break;
      buf += dec.decode(value, { stream: true });
      let nl;
      while ((nl = buf.indexOf('\n')) >= 0) {
        const line = buf.slice(0, nl);
        buf = buf.slice(nl + 1);
        if (line) checkLine(JSON.parse(line), bar, status);
      }
    }
  } catch (e) {
    if (e.name !== 'AbortError') status.textContent = 'The check failed: ' + e.message;
  } finally {
    if (state.checking === ctrl) state.checking = null;
  }
}

function checkLine(m, bar, status) {
  if (m.progress) {
    const p = m.progress;
    if (p.total > 0) {
      bar.max = p.total;
      bar.value = p.done;
      status.textContent = `${p.stage}: ${p.done} of ${p.total} waveform solves`;
    } else {
      bar.removeAttribute('value');
      status.textContent = `${p.stage}: ${p.done} waveform solves`;
    }
    return;
  }
  if (m.stale) {
    bar.value = 0;
    status.textContent = 'Stopped: the values changed. Check again for the new values.';
    return;
  }
  const v = m.result;
  bar.max = 1;
  bar.value = 1;
  if (v.errors) {
    status.textContent = 'Not checked: a value is refused.';
    return;
  }
  if (v.failure) {
    status.textContent = 'The check failed: ' + v.failure;
    return;
  }
  status.textContent = `done in ${v.seconds.toFixed(2)} s`;
  cardsInto($('check-cards'), v.cards);
  for (const f of v.figures || []) showFigure(f.id, f.svg);
  const tables = $('check-tables');
  for (const t of v.tables || []) tables.appendChild(tableElement(t));
  listInto($('check-notes'), (v.cautions || []).map((c) => 'Caution: ' + c).concat(v.notes || []));
}

async function start() {
  try {
    const r = await fetch('/api/setup');
    const s = await r.json();
    if (!r.ok) throw new Error(s.error || r.statusText);
    state.setup = s;
    document.title = s.title + ' · qpoint explore';
    $('title').textContent = s.title;
    $('subtitle').textContent = s.file;
    buildControls(s);
    const pick = $('diode');
    for (const [i, d] of (s.diodes || []).entries()) {
      const o = el('option', '', d);
      o.value = i;
      pick.appendChild(o);
    }
    $('diode-pick').hidden = (s.diodes || []).length < 2;
    pick.addEventListener('change', () => { state.diode = Number(pick.value); schedule(); });
    const save = $('save-circuit'), rep = $('save-report');
    save.hidden = !s.circuitPath;
    rep.hidden = !s.reportPath;
    save.title = 'writes ' + s.circuitPath;
    rep.title = 'writes ' + s.reportPath;
    save.addEventListener('click', () => post('/api/save-circuit', save));
    rep.addEventListener('click', () => post('/api/save-report', rep));
    $('check').addEventListener('click', check);
    if (s.warnings && s.warnings.length) listInto($('notes'), s.warnings);
    schedule();
  } catch (e) {
    $('status').textContent = 'The page could not start: ' + e.message;
  }
}

start();
