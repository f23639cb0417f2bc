'use strict';
(() => {
  const $ = id => document.getElementById(id);
  function pct(v) { return v === null || v === undefined ? '–' : Zbin.fmt(v, 2) + ' %'; }
  const cards = new Map();
  /* Each line's card is made once and then updated in place, so a link or the focus is never pulled away. */
  function card(line) {
    let c = cards.get(line);
    if (c) return c;
    const el = document.createElement('article'); el.className = 'plant-card'; el.dataset.line = line;
    const h = document.createElement('h2');
    const a = document.createElement('a'); a.href = '/line/' + encodeURIComponent(line); a.textContent = line;
    h.append(a);
    const badge = document.createElement('div'); badge.className = 'mode';
    const svg = Zbin.el('svg', { class: 'shape', viewBox: '0 0 20 20', 'aria-hidden': 'true' });
    const path = Zbin.el('path', { d: '' }); svg.append(path);
    const word = document.createElement('span');
    badge.append(svg, word);
    const dl = document.createElement('dl');
    el.append(h, badge, dl);
    c = { el, badge, path, word, dl };
    cards.set(line, c);
    return c;
  }
  function render(p) {
    const box = $('lines');
    $('count').textContent = String(p.lines.length);
    $('updated').textContent = Zbin.clock(p.at);
    $('none').hidden = p.lines.length > 0;
    p.lines.forEach(l => {
      const c = card(l.line);
      if (c.el.parentNode !== box) box.append(c.el);
      Zbin.mode(c.badge, c.path, c.word, l.mode, !l.online && l.offline_since ? 'Offline since ' + Zbin.clock(l.offline_since) : null);
      while (c.dl.firstChild) c.dl.removeChild(c.dl.firstChild);
      [['Lot', l.lot || '–'], ['Recipe', l.recipe || '–'], ['Lot yield', pct(l.yield_pct)], ['Last 10 min', pct(l.yield_10_min_pct)],
       ['Parts per hour', l.uph === undefined || l.uph === null ? '–' : String(l.uph)],
       ['Alarms', l.alarm_codes.length === 0 ? 'none' : l.alarm_codes.join(', ') + (l.unacknowledged ? ' (' + l.unacknowledged + ' not acknowledged)' : '')]]
        .forEach(([k, v]) => { const dt = document.createElement('dt'); dt.textContent = k; const dd = document.createElement('dd'); dd.textContent = v; c.dl.append(dt, dd); });
    });
  }
  function lost(since) {
    const p = $('lost');
    p.hidden = !since;
    if (since) p.textContent = 'Connection to the panel lost since ' + since.toLocaleTimeString() + ' — reconnecting by itself.';
  }
  Zbin.live('/events/lines', render, lost);
})();
