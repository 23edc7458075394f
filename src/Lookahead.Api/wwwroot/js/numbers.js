// Axis ranges, ticks and number text shared by the charts, the tables and the CSV files.

/** Steps of 1, 2 or 5 × 10^k, about `target` of them over the range (a flat range gets a margin around it). */
export function niceRange(min, max, target = 5) {
  if (!Number.isFinite(min) || !Number.isFinite(max)) {
    return { low: 0, high: 1, step: 0.2 };
  }

  if (max - min < 1e-12) {
    const pad = Math.max(Math.abs(min) * 0.1, 0.5);
    min -= pad;
    max += pad;
  }

  const rough = (max - min) / target;
  const magnitude = 10 ** Math.floor(Math.log10(rough));
  const fraction = rough / magnitude;
  const step = (fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10) * magnitude;
  return { low: Math.floor(min / step) * step, high: Math.ceil(max / step) * step, step };
}

export function ticks(range) {
  const count = Math.round((range.high - range.low) / range.step);
  const values = [];
  for (let i = 0; i <= count && i <= 100; i++) {
    const v = range.low + (i * range.step);
    values.push(Math.abs(v) < range.step * 1e-9 ? 0 : v);
  }

  return values;
}

/** Four significant digits for people (tables, readouts, ticks), with a real minus sign. */
export function formatNumber(value) {
  if (!Number.isFinite(value)) {
    return '–';
  }

  const text = Math.abs(value) >= 1e5 || (value !== 0 && Math.abs(value) < 1e-3)
    ? value.toExponential(3)
    : String(Number(value.toPrecision(4)));
  return text.replace('-', '−');
}
