'use strict';
(() => {
  const $ = id => document.getElementById(id);
  const lineId = decodeURIComponent(location.pathname.split('/')[2] || '');
  let view = null, token = sessionStorage.getItem('zbin-token:' + lineId), who = null;
  $('line').textContent = lineId;
  document.title = 'zbin · ' + lineId;

  function pct(v) { return v === null || v === undefined ? '–' : Zbin.fmt(v, 2) + ' %'; }
  function ms(v) { return v === null || v === undefined ? '–' : Zbin.fmt(v, 2) + ' ms'; }
  function count(v) { return v === null || v === undefined ? '–' : String(v); }

  function render(v) {
    view = v;
    const d = v.dashboard || {};
    const online = v.online;
    let words = null;
    if (!online && v.offline_since) words = 'Offline since ' + Zbin.clock(v.offline_since);
    Zbin.mode($('mode'), $('mode-shape'), $('mode-text'), v.mode, words);
    $('lot').textContent = d.lot || '–';
    $('recipe').textContent = v.recipe || d.recipe || '–';
    $('updated').textContent = Zbin.clock(d.at || v.heard_at);
    $('updated').dataset.at = d.at || '';
    $('yield').textContent = pct(d.yield_pct);
    $('yield-ci').textContent = d.yield_low_pct === undefined || d.yield_low_pct === null ? '' :
      '95 % interval ' + Zbin.fmt(d.yield_low_pct, 2) + ' – ' + Zbin.fmt(d.yield_high_pct, 2) + ' %';
    $('parts').textContent = d.parts === undefined ? '' : count(d.passed) + ' of ' + count(d.parts) + ' parts passed';
    const w = d.last_10_min || {};
    $('yield-10').textContent = pct(w.yield_pct);
    $('yield-10-ci').textContent = w.yield_low_pct === undefined || w.yield_low_pct === null ? '' :
      '95 % interval ' + Zbin.fmt(w.yield_low_pct, 2) + ' – ' + Zbin.fmt(w.yield_high_pct, 2) + ' %';
    $('parts-10').textContent = w.parts === undefined ? '' : count(w.passed) + ' of ' + count(w.parts) + ' parts';
    $('uph').textContent = d.uph === undefined || d.uph === null ? '–' : String(d.uph);
    $('uph-hour').textContent = d.uph_hour === undefined ? '' : count(d.uph_hour) + ' in the last hour';
    const lat = d.latency_ms || {};
    $('p99').textContent = ms(lat.p99);
    $('p99').classList.toggle('over', lat.p99 !== null && d.deadline_ms !== undefined && lat.p99 > d.deadline_ms);
    $('latency').textContent = 'p50 ' + ms(lat.p50) + ' · deadline ' + (d.deadline_ms === undefined ? '–' : d.deadline_ms + ' ms') +
      ' · ' + count(d.late) + ' late';
    const link = d.meter_link;
    $('meter').textContent = link === 'up' ? 'Up' : link === 'down' ? 'Down' : link === 'setup-refused' ? 'Refused setup' : '–';
    $('meter').classList.toggle('over', link !== undefined && link !== 'up');
    $('records').textContent = d.record_backlog === undefined ? '' : 'record backlog ' + d.record_backlog + ' · outbox ' + d.mqtt_buffered;
    const m = d.monitor || {};
    const comp = m.compensation || {};
    $('comp-age').textContent = comp.age_h === undefined || comp.age_h === null ? '–' : Zbin.fmt(comp.age_h, 2) + ' h';
    $('comp-src').textContent = comp.source ? 'source: ' + comp.source : '';
    renderAlarms(v.alarms || []);
    renderBins(d.bins || []);
    renderReasons(d.reasons || {});
    renderTrends(v.trend || [], d, m);
    $('operator').hidden = !v.actions;
    $('readonly').hidden = !!v.actions;
  }

  let shownAlarms = null, shownFor = null;
  /*
   * Rebuilt only when an alarm, an acknowledgement or the sign-in changed. A rebuild keeps what the operator was doing
   * in the items that stay: each open alarm's typed note (while the same operator is signed in), and the focus (with
   * the caret) in a note or on its button.
   */
  function renderAlarms(list) {
    const signature = JSON.stringify([list, !!(view && view.actions), who]);
    if (signature === shownAlarms) return;
    shownAlarms = signature;
    const ul = $('alarms');
    // a note is the signed-in operator's own: one signed in after another does not inherit it
    const typed = {}, sameOperator = shownFor === who;
    shownFor = who;
    if (sameOperator) ul.querySelectorAll('li').forEach(li => { const n = li.querySelector('input'); if (n && n.value) typed[li.dataset.code] = n.value; });
    const active = document.activeElement, focusLi = active && ul.contains(active) ? active.closest('li') : null;
    const focus = focusLi ? { code: focusLi.dataset.code, tag: active.tagName,
      start: active.tagName === 'INPUT' ? active.selectionStart : null, end: active.tagName === 'INPUT' ? active.selectionEnd : null } : null;
    while (ul.firstChild) ul.removeChild(ul.firstChild);
    $('no-alarms').hidden = list.length > 0;
    list.forEach(a => {
      const li = document.createElement('li');
      li.className = (a.severity === 'critical' ? 'critical' : 'warning') + (a.acknowledged ? ' acked' : '');
      li.dataset.code = a.code;
      const head = document.createElement('div');
      const code = document.createElement('span'); code.className = 'code'; code.textContent = a.code;
      const sev = document.createElement('span'); sev.className = 'sev'; sev.textContent = a.severity === 'critical' ? '▲ critical' : '◆ warning';
      head.append(code, sev);
      const msg = document.createElement('p'); msg.className = 'msg'; msg.textContent = a.message;
      const meta = document.createElement('div'); meta.className = 'meta'; meta.textContent = 'since ' + Zbin.when(a.since);
      li.append(head, msg, meta);
      if (a.acknowledged) {
        const ack = document.createElement('div'); ack.className = 'ackd';
        ack.textContent = '✓ acknowledged by ' + a.acknowledged.by + ' at ' + Zbin.clock(a.acknowledged.at) +
          (a.acknowledged.note ? ': ' + a.acknowledged.note : '');
        li.append(ack);
      } else if (view && view.actions && who) {
        const f = document.createElement('form'); f.className = 'ack-form';
        const note = document.createElement('input'); note.type = 'text'; note.maxLength = 120; note.placeholder = 'note (optional)';
        note.setAttribute('aria-label', 'note for ' + a.code);
        if (typed[a.code]) note.value = typed[a.code];
        const b = document.createElement('button'); b.type = 'submit'; b.textContent = 'Acknowledge ' + a.code; b.className = 'ack';
        f.append(note, b);
        f.addEventListener('submit', e => { e.preventDefault(); act({ action: 'acknowledge', alarm: a.code, note: note.value }); });
        li.append(f);
      }
      ul.append(li);
    });
    if (focus) {
      const li = [...ul.children].find(x => x.dataset.code === focus.code);
      const el = li && li.querySelector(focus.tag === 'INPUT' ? 'input' : 'button');
      if (el) {
        el.focus();
        if (focus.start !== null) el.setSelectionRange(focus.start, focus.end);
      }
    }
  }

  function renderBins(bins) {
    Zbin.bars($('bins'), bins.map(b => ({
      label: 'bin ' + b.bin + ' ' + b.grade,
      value: b.count,
      text: b.count + ' · ' + Zbin.fmt(b.pct, 2) + ' %',
      cls: b.verdict === 'pass' ? '' : b.verdict
    })));
  }

  function renderReasons(reasons) {
    const tb = $('reasons');
    while (tb.firstChild) tb.removeChild(tb.firstChild);
    Object.keys(reasons).forEach(r => {
      const tr = document.createElement('tr');
      const a = document.createElement('td'); a.textContent = r;
      const b = document.createElement('td'); b.className = 'num'; b.textContent = String(reasons[r]);
      tr.append(a, b); tb.append(tr);
    });
  }

  function drift(svgId, stateId, trend, key, chart) {
    const pts = trend.map(p => p[key] || null);
    const last = pts.length ? pts[pts.length - 1] : null;
    Zbin.trend($(svgId), [
      { values: pts.map(p => p && p.high), cls: 'limit' },
      { values: pts.map(p => p && p.low), cls: 'limit' },
      { values: pts.map(p => p && p.base), cls: 'base' },
      { values: pts.map(p => p && p.ewma), cls: 'series' }
    ], [], chart && chart.learning ? 'learning the baseline' : 'no chart points yet');
    $(stateId).textContent = chart ? (chart.quantity ? chart.quantity + ': ' : '') + (chart.state || '') +
      (last ? ' · baseline ' + Number(last.base).toPrecision(4) : '') : '';
  }

  function renderTrends(trend, d, m) {
    drift('chart-value', 'value-state', trend, 'value', m.value_drift);
    drift('chart-loss', 'loss-state', trend, 'loss', m.loss_drift);
    Zbin.trend($('chart-open'), [{ values: trend.map(p => p.open_pf ?? null), cls: 'series' }], [], 'no open residual yet');
    Zbin.trend($('chart-short'), [{ values: trend.map(p => p.short_mohm ?? null), cls: 'series' }], [], 'no short residual yet');
    Zbin.trend($('chart-latency'), [
      { values: trend.map(p => p.p99_ms ?? null), cls: 'series' },
      { values: trend.map(p => p.p50_ms ?? null), cls: 'series2' }
    ], [{ value: d.deadline_ms, cls: 'limit' }]);
    Zbin.trend($('chart-yield'), [
      { values: trend.map(p => p.yield_pct ?? null), cls: 'series' },
      { values: trend.map(p => p.yield_10_min_pct ?? null), cls: 'series2' }
    ], []);
  }

  function lost(since) {
    const p = $('lost');
    if (!since) { p.hidden = true; return; }
    p.hidden = false;
    p.textContent = 'Connection to the line lost since ' + since.toLocaleTimeString() + ' — reconnecting by itself.';
    Zbin.mode($('mode'), $('mode-shape'), $('mode-text'), 'offline', 'Offline since ' + since.toLocaleTimeString());
  }

  function headers() { return { 'Authorization': 'Bearer ' + token, 'Content-Type': 'application/json' }; }

  async function signin(t) {
    token = t;
    const r = await fetch('/api/whoami', { headers: headers(), cache: 'no-store' });
    if (r.status !== 200) { token = null; who = null; sessionStorage.removeItem('zbin-token:' + lineId); showWho('Unknown token.'); return; }
    const j = await r.json();
    who = j.who || null;
    if (who) sessionStorage.setItem('zbin-token:' + lineId, token);
    showWho('');
  }

  function showWho(message) {
    $('signin').hidden = !!who;
    $('controls').hidden = !who;
    $('who').textContent = who ? 'Signed in as ' + who : '';
    $('feedback').textContent = message;
    if (view) renderAlarms(view.alarms || []);
  }

  async function act(body) {
    const r = await fetch('/api/line/' + encodeURIComponent(lineId) + '/action', { method: 'POST', headers: headers(), body: JSON.stringify(body) });
    const text = await r.text();
    let msg = text;
    try { const j = JSON.parse(text); msg = j.message || j.error || text; } catch (e) { /* plain-text refusal */ }
    $('feedback').textContent = (r.ok ? 'Done: ' : 'Refused: ') + msg;
    if (r.status === 401) { who = null; showWho('Refused: ' + msg); }
  }

  $('signin').addEventListener('submit', e => { e.preventDefault(); signin($('token').value); $('token').value = ''; });
  $('signout').addEventListener('click', () => { token = null; who = null; sessionStorage.removeItem('zbin-token:' + lineId); showWho('Signed out.'); });
  $('pause').addEventListener('click', () => act({ action: 'pause' }));
  $('resume').addEventListener('click', () => act({ action: 'resume' }));
  if (token) signin(token);
  Zbin.live('/events/line/' + encodeURIComponent(lineId), render, lost);
  window.addEventListener('resize', () => { if (view) render(view); });
})();
