'use strict';
/* The status pages' own small SVG charts and shared helpers: no library, nothing fetched from elsewhere. */
const Zbin = (() => {
  const NS = 'http://www.w3.org/2000/svg';
  function el(name, attrs, text) {
    const e = document.createElementNS(NS, name);
    for (const k in attrs) e.setAttribute(k, attrs[k]);
    if (text !== undefined) e.textContent = text;
    return e;
  }
  function clear(svg) { while (svg.firstChild) svg.removeChild(svg.firstChild); }
  function size(svg) {
    const r = svg.getBoundingClientRect();
    return { w: Math.max(200, Math.round(r.width)), h: Math.max(100, Math.round(r.height)) };
  }
  function fmt(v, digits) {
    if (v === null || v === undefined || !isFinite(v)) return '–';
    return Number(v).toFixed(digits);
  }
  function niceTick(v) {
    const a = Math.abs(v);
    if (a === 0) return '0';
    if (a >= 1000) return v.toFixed(0);
    if (a >= 10) return v.toFixed(1);
    if (a >= 1) return v.toFixed(2);
    return v.toPrecision(3);
  }
  /* A trend: lines are [{values: [numbers or null], cls}], level lines [{value, cls}]. */
  function trend(svg, lines, levels, empty) {
    clear(svg);
    const { w, h } = size(svg);
    svg.setAttribute('viewBox', '0 0 ' + w + ' ' + h);
    const all = [];
    lines.forEach(l => l.values.forEach(v => { if (v !== null && isFinite(v)) all.push(v); }));
    (levels || []).forEach(l => { if (l.value !== null && isFinite(l.value)) all.push(l.value); });
    const n = Math.max(0, ...lines.map(l => l.values.length));
    if (all.length === 0 || n === 0) {
      svg.appendChild(el('text', { x: 12, y: h / 2, class: 'empty' }, empty || 'no figures yet'));
      return;
    }
    let lo = Math.min(...all), hi = Math.max(...all);
    if (hi - lo < 1e-12) { const d = Math.abs(hi) * 0.01 || 1; lo -= d; hi += d; }
    const pad = (hi - lo) * 0.08; lo -= pad; hi += pad;
    const left = 58, right = 8, top = 8, bottom = 18;
    const x = i => left + (n <= 1 ? 0 : i * (w - left - right) / (n - 1));
    const y = v => top + (hi - v) * (h - top - bottom) / (hi - lo);
    svg.appendChild(el('line', { x1: left, y1: top, x2: left, y2: h - bottom, class: 'axis' }));
    svg.appendChild(el('line', { x1: left, y1: h - bottom, x2: w - right, y2: h - bottom, class: 'axis' }));
    [hi - pad, (hi + lo) / 2, lo + pad].forEach(t => svg.appendChild(el('text', { x: 4, y: y(t) + 4, class: 'tick' }, niceTick(t))));
    svg.appendChild(el('text', { x: left, y: h - 3, class: 'tick' }, n + ' dashboards'));
    (levels || []).forEach(l => {
      if (l.value === null || !isFinite(l.value)) return;
      svg.appendChild(el('line', { x1: left, y1: y(l.value), x2: w - right, y2: y(l.value), class: l.cls }));
    });
    lines.forEach(l => {
      let d = '', pen = false;
      l.values.forEach((v, i) => {
        if (v === null || !isFinite(v)) { pen = false; return; }
        d += (pen ? 'L' : 'M') + x(i).toFixed(1) + ' ' + y(v).toFixed(1) + ' ';
        pen = true;
      });
      if (d) svg.appendChild(el('path', { d: d, class: l.cls }));
    });
  }
  /* Horizontal bars: [{label, value, cls}]. */
  function bars(svg, items, empty) {
    clear(svg);
    const { w, h } = size(svg);
    svg.setAttribute('viewBox', '0 0 ' + w + ' ' + h);
    if (items.length === 0) {
      svg.appendChild(el('text', { x: 12, y: h / 2, class: 'empty' }, empty || 'no parts yet'));
      return;
    }
    const max = Math.max(...items.map(i => i.value), 1);
    const row = Math.min(28, (h - 4) / items.length);
    const left = 150, right = 110;
    items.forEach((it, k) => {
      const yy = 2 + k * row;
      svg.appendChild(el('text', { x: 4, y: yy + row * 0.68, class: 'label' }, it.label));
      const bw = Math.max(1, (w - left - right) * it.value / max);
      svg.appendChild(el('rect', { x: left, y: yy + 3, width: bw.toFixed(1), height: Math.max(4, row - 6), class: 'bar ' + (it.cls || '') }));
      svg.appendChild(el('text', { x: left + bw + 6, y: yy + row * 0.68, class: 'label' }, it.text));
    });
  }
  const SHAPES = {
    ready: 'M10 2a8 8 0 1 0 0.01 0z',
    paused: 'M3 3h14v14H3z',
    fault: 'M10 1L19 18H1z',
    offline: 'M2 8h16v4H2z'
  };
  const WORDS = { ready: 'Ready', paused: 'Paused', fault: 'Fault', offline: 'Offline' };
  function mode(badge, shape, text, key, words) {
    const k = SHAPES[key] ? key : 'offline';
    badge.className = 'mode mode-' + k;
    shape.setAttribute('d', SHAPES[k]);
    text.textContent = words || WORDS[k];
  }
  function clock(iso) {
    if (!iso) return '–';
    const d = new Date(iso);
    return isNaN(d) ? '–' : d.toLocaleTimeString([], { hour: '2-digit', minute: '2-digit', second: '2-digit' });
  }
  function when(iso) {
    if (!iso) return '–';
    const d = new Date(iso);
    return isNaN(d) ? '–' : d.toLocaleString([], { month: 'short', day: 'numeric', hour: '2-digit', minute: '2-digit', second: '2-digit' });
  }
  /* An event stream that reconnects by itself and says since when it has been lost. */
  function live(url, onView, onLost) {
    let es = null, lostAt = null;
    function open() {
      es = new EventSource(url);
      es.addEventListener('view', e => { lostAt = null; onLost(null); onView(JSON.parse(e.data)); });
      es.onerror = () => {
        if (!lostAt) lostAt = new Date();
        onLost(lostAt);
        if (es.readyState === EventSource.CLOSED) { es.close(); setTimeout(open, 2000); }
      };
    }
    open();
  }
  return { el, clear, trend, bars, fmt, mode, clock, when, live };
})();
