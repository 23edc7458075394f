// Line charts drawn as SVG by the page itself: a handful of shapes (held steps, limits, shaded violations, a cursor)
// needs no charting library, and drawing them here keeps the page free of anything fetched or built.
import { niceRange, ticks, formatNumber } from './numbers.js';

const SVG = 'http://www.w3.org/2000/svg';
const WIDTH = 720;
const HEIGHT = 280;
const MARGIN = { left: 64, right: 96, top: 14, bottom: 42 };

/** Signal colours; limits and shading use their own (see tuning.css), so a limit never looks like a signal. */
export const PALETTE = ['#1b5fa8', '#c25a00', '#6a3d9a', '#00847e', '#a8326e', '#4f6d00', '#7a5230', '#3d3d8f'];

function el(name, attributes = {}, parent = null) {
  const node = document.createElementNS(SVG, name);
  for (const [key, value] of Object.entries(attributes)) {
    node.setAttribute(key, String(value));
  }

  parent?.appendChild(node);
  return node;
}

/**
 * Draws one chart.
 * spec: { title, xLabel, yLabel, unitOf(series) → string, series: [{ label, role, x, y, colour, stepped, limit }] }
 *   role: 'signal' | 'setpoint' | 'estimate' | 'measurement' | 'limit-min' | 'limit-max'
 *   limit (outputs with soft limits): { min, max } checked against the signal to shade its violations.
 * Returns a figure element holding the SVG and a readout line that follows the cursor (mouse or arrow keys).
 */
export function drawChart(spec) {
  const figure = document.createElement('figure');
  figure.className = 'chart';
  const caption = document.createElement('figcaption');
  caption.textContent = spec.title;
  figure.appendChild(caption);

  const svg = el('svg', { viewBox: `0 0 ${WIDTH} ${HEIGHT}`, role: 'img', tabindex: 0, 'aria-label': `${spec.title}. Use the left and right arrow keys to read values.` });
  svg.dataset.chart = spec.id;
  figure.appendChild(svg);

  const xs = spec.series.flatMap(s => s.x);
  const ys = spec.series.flatMap(s => s.y).filter(Number.isFinite);
  const xRange = niceRange(Math.min(...xs), Math.max(...xs), 8);
  const yRange = niceRange(ys.length ? Math.min(...ys) : 0, ys.length ? Math.max(...ys) : 1, 5);
  const plotW = WIDTH - MARGIN.left - MARGIN.right;
  const plotH = HEIGHT - MARGIN.top - MARGIN.bottom;
  const X = x => MARGIN.left + ((x - xRange.low) / (xRange.high - xRange.low)) * plotW;
  const Y = y => MARGIN.top + plotH - ((y - yRange.low) / (yRange.high - yRange.low)) * plotH;

  el('rect', { x: MARGIN.left, y: MARGIN.top, width: plotW, height: plotH, class: 'plot-area' }, svg);
  const grid = el('g', { class: 'grid' }, svg);
  for (const y of ticks(yRange)) {
    el('line', { x1: MARGIN.left, x2: MARGIN.left + plotW, y1: Y(y), y2: Y(y) }, grid);
    el('text', { x: MARGIN.left - 6, y: Y(y) + 4, 'text-anchor': 'end', class: 'tick' }, svg).textContent = formatNumber(y);
  }

  for (const x of ticks(xRange)) {
    el('line', { x1: X(x), x2: X(x), y1: MARGIN.top, y2: MARGIN.top + plotH }, grid);
    el('text', { x: X(x), y: MARGIN.top + plotH + 16, 'text-anchor': 'middle', class: 'tick' }, svg).textContent = formatNumber(x);
  }

  el('text', { x: MARGIN.left + (plotW / 2), y: HEIGHT - 6, 'text-anchor': 'middle', class: 'axis-label' }, svg).textContent = spec.xLabel;
  const yl = el('text', { x: 14, y: MARGIN.top + (plotH / 2), 'text-anchor': 'middle', class: 'axis-label', transform: `rotate(-90 14 ${MARGIN.top + (plotH / 2)})` }, svg);
  yl.textContent = spec.yLabel;

  // Violations first, then limits, then the signals: a signal lying on its limit is drawn over it and stays visible.
  const shading = el('g', { class: 'violations' }, svg);
  for (const s of spec.series.filter(s => s.role === 'signal' && s.limit)) {
    for (const [from, to] of violationSpans(s)) {
      el('rect', { x: X(s.x[from]) - 2, y: MARGIN.top, width: Math.max(X(s.x[to]) - X(s.x[from]) + 4, 4), height: plotH, class: 'violation' }, shading)
        .appendChild(titleOf(`${s.label} outside its soft limits`));
    }
  }

  const ordered = [...spec.series.filter(s => s.role.startsWith('limit')), ...spec.series.filter(s => !s.role.startsWith('limit'))];
  for (const s of ordered) {
    const path = el('path', { d: pathOf(s, X, Y), class: `series ${s.role}` }, svg);
    if (!s.role.startsWith('limit')) {
      path.setAttribute('stroke', PALETTE[s.colour % PALETTE.length]);
    }

    path.dataset.series = s.label;
    path.dataset.role = s.role;
    path.dataset.points = String(s.y.filter(Number.isFinite).length);
    path.appendChild(titleOf(s.label));
    if (s.role.startsWith('limit')) {
      const value = s.y[0];
      const label = el('text', { x: MARGIN.left + plotW + 4, y: Y(value) + 4, class: `limit-label ${s.role}` }, svg);
      label.textContent = `${s.role === 'limit-min' ? 'min' : 'max'} ${formatNumber(value)}${unitSuffix(spec.unitOf(s))}`;
      label.appendChild(titleOf(s.label));
    }
  }

  figure.appendChild(legendOf(spec.series));
  const readout = document.createElement('output');
  readout.className = 'readout';
  readout.setAttribute('aria-live', 'polite');
  readout.textContent = 'Point at the chart, or focus it and use the arrow keys, to read values.';
  figure.appendChild(readout);
  attachCursor(svg, spec, readout, X, { top: MARGIN.top, height: plotH, left: MARGIN.left, width: plotW, xRange });
  return figure;
}

function titleOf(text) {
  const title = el('title');
  title.textContent = text;
  return title;
}

function unitSuffix(unit) {
  return unit ? ` ${unit}` : '';
}

function pathOf(s, X, Y) {
  let d = '';
  let open = false;
  for (let k = 0; k < s.x.length; k++) {
    const y = s.y[k];
    if (!Number.isFinite(y)) {
      open = false;
      continue;
    }

    if (open && s.stepped) {
      d += `H${X(s.x[k]).toFixed(2)}`;
    }

    d += `${open ? 'L' : 'M'}${X(s.x[k]).toFixed(2)},${Y(y).toFixed(2)}`;
    open = true;
  }

  return d;
}

/** Runs of samples [from, to] where the signal leaves its soft limits (by more than rounding). */
export function violationSpans(s) {
  const spans = [];
  const tolerance = 1e-9 * Math.max(1, Math.abs(s.limit.min ?? 0), Math.abs(s.limit.max ?? 0));
  let start = -1;
  for (let k = 0; k <= s.y.length; k++) {
    const y = s.y[k];
    const out = k < s.y.length && Number.isFinite(y)
      && ((s.limit.min != null && y < s.limit.min - tolerance) || (s.limit.max != null && y > s.limit.max + tolerance));
    if (out && start < 0) {
      start = k;
    } else if (!out && start >= 0) {
      spans.push([start, k - 1]);
      start = -1;
    }
  }

  return spans;
}

function legendOf(series) {
  const list = document.createElement('ul');
  list.className = 'legend';
  for (const s of series) {
    const item = document.createElement('li');
    const swatch = document.createElement('span');
    swatch.className = `swatch ${s.role}`;
    if (!s.role.startsWith('limit')) {
      swatch.style.borderTopColor = PALETTE[s.colour % PALETTE.length];
    }

    item.append(swatch, document.createTextNode(s.label));
    list.appendChild(item);
  }

  return list;
}

function attachCursor(svg, spec, readout, X, plot) {
  const times = [...new Set(spec.series.filter(s => !s.role.startsWith('limit')).flatMap(s => s.x))].sort((a, b) => a - b);
  if (times.length === 0) {
    return;
  }

  const cursor = el('line', { y1: plot.top, y2: plot.top + plot.height, class: 'cursor', visibility: 'hidden' }, svg);
  let index = -1;
  const show = i => {
    index = Math.max(0, Math.min(times.length - 1, i));
    const t = times[index];
    cursor.setAttribute('x1', X(t));
    cursor.setAttribute('x2', X(t));
    cursor.setAttribute('visibility', 'visible');
    const parts = spec.series.filter(s => !s.role.startsWith('limit')).map(s => {
      const k = valueIndex(s, t);
      return k < 0 ? null : `${s.label} ${formatNumber(s.y[k])}${unitSuffix(spec.unitOf(s))}`;
    }).filter(Boolean);
    readout.textContent = `${spec.xLabel.replace(/ \(.*\)$/, '')} ${formatNumber(t)}${spec.timeUnit ? ` ${spec.timeUnit}` : ''}: ${parts.join(' · ')}`;
  };

  svg.addEventListener('pointermove', event => {
    const box = svg.getBoundingClientRect();
    const x = ((event.clientX - box.left) / box.width) * WIDTH;
    const t = plot.xRange.low + ((x - plot.left) / plot.width) * (plot.xRange.high - plot.xRange.low);
    let best = 0;
    for (let i = 1; i < times.length; i++) {
      if (Math.abs(times[i] - t) < Math.abs(times[best] - t)) {
        best = i;
      }
    }

    show(best);
  });
  svg.addEventListener('keydown', event => {
    const moves = { ArrowRight: 1, ArrowLeft: -1, PageUp: 10, PageDown: -10 };
    if (event.key in moves) {
      show(index < 0 ? 0 : index + moves[event.key]);
      event.preventDefault();
    } else if (event.key === 'Home' || event.key === 'End') {
      show(event.key === 'Home' ? 0 : times.length - 1);
      event.preventDefault();
    }
  });
}

/** The sample a series shows at time t: the exact one, or for a held (stepped) series the last one before t. */
function valueIndex(s, t) {
  let found = -1;
  for (let k = 0; k < s.x.length; k++) {
    if (s.x[k] === t) {
      return Number.isFinite(s.y[k]) ? k : -1;
    }

    if (s.stepped && s.x[k] < t) {
      found = k;
    }
  }

  return found >= 0 && Number.isFinite(s.y[found]) ? found : -1;
}
