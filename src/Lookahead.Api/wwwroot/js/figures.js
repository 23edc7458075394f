// A plan or a closed-loop run as three figures (outputs, inputs, input moves), each a chart, a table beside it and
// a CSV download of exactly what the table shows.
import { drawChart, violationSpans } from './chart.js';
import { formatNumber } from './numbers.js';
import { sharedUnit } from './model.js';

function column(rows, j) {
  return rows.map(r => r[j]);
}

/** Seconds, or minutes once the run is ten minutes or longer (as the service's own charts do). */
function timeAxis(model, count) {
  const minutes = model.sampleTime * count >= 600;
  const scale = minutes ? model.sampleTime / 60 : model.sampleTime;
  return { unit: minutes ? 'min' : 's', times: n => Array.from({ length: n }, (_, k) => k * scale) };
}

/** One line per distinct bound value; a bound shared by several signals is drawn once and names them. */
function limitSeries(bounds, names, units, role, times) {
  const groups = new Map();
  bounds.forEach((b, j) => {
    if (b != null && j < names.length) {
      groups.set(b, [...(groups.get(b) ?? []), j]);
    }
  });
  const which = role === 'limit-min' ? 'min' : 'max';
  return [...groups].map(([value, members]) => ({
    label: `${members.length === names.length && names.length > 1 ? 'all' : members.map(j => names[j]).join(', ')} ${which} ${formatNumber(value)}${units[members[0]] ? ` ${units[members[0]]}` : ''}`,
    role,
    x: [times[0], times[times.length - 1]],
    y: [value, value],
    colour: 0,
    unit: units[members[0]],
  }));
}

function held(values) {
  return values.length ? [...values, values[values.length - 1]] : values;
}

/**
 * kind: 'plan' | 'simulation'; answer: the service's JSON; scenario: what was asked (for a plan's setpoints and the
 * input before the first move).
 */
export function figuresFor(kind, model, answer, scenario) {
  const steps = answer.inputs.length;
  const axis = timeAxis(model, steps);
  const sampleTimes = axis.times(answer.outputs.length);
  const moveTimes = axis.times(steps + 1);
  const { outputs: outNames, inputs: inNames } = model.labels;
  const { outputs: outUnits, inputs: inUnits } = model.units;
  const xLabel = `time (${axis.unit})`;

  const outputSeries = outNames.map((name, j) => ({
    label: name, role: 'signal', x: sampleTimes, y: column(answer.outputs, j), colour: j, unit: outUnits[j],
    limit: model.limits.outputMin[j] != null || model.limits.outputMax[j] != null ? { min: model.limits.outputMin[j], max: model.limits.outputMax[j] } : null,
  }));
  if (answer.estimatedOutputs) {
    outNames.forEach((name, j) => outputSeries.push({ label: `${name} estimate`, role: 'estimate', x: axis.times(answer.estimatedOutputs.length), y: column(answer.estimatedOutputs, j), colour: j, unit: outUnits[j] }));
  }

  if (answer.measurements && scenario.noise) {
    outNames.forEach((name, j) => outputSeries.push({ label: `${name} measured`, role: 'measurement', x: axis.times(answer.measurements.length), y: column(answer.measurements, j), colour: j, unit: outUnits[j] }));
  }

  const references = kind === 'simulation' ? answer.references : planReferences(model, scenario, steps);
  if (references) {
    outNames.forEach((name, j) => outputSeries.push({ label: `${name} setpoint`, role: 'setpoint', x: moveTimes, y: held(column(references, j)), colour: j, stepped: true, unit: outUnits[j] }));
  }

  outputSeries.push(...limitSeries(model.limits.outputMin, outNames, outUnits, 'limit-min', sampleTimes));
  outputSeries.push(...limitSeries(model.limits.outputMax, outNames, outUnits, 'limit-max', sampleTimes));

  const inputSeries = inNames.map((name, i) => ({ label: name, role: 'signal', x: moveTimes, y: held(column(answer.inputs, i)), colour: i, stepped: true, unit: inUnits[i] }));
  inputSeries.push(...limitSeries(model.limits.inputMin, inNames, inUnits, 'limit-min', moveTimes));
  inputSeries.push(...limitSeries(model.limits.inputMax, inNames, inUnits, 'limit-max', moveTimes));

  // Moves Δu_k = u_k − u_{k−1}, from the input held before the first move when it was given.
  const moveSeries = inNames.map((name, i) => {
    const u = column(answer.inputs, i);
    const before = scenario.previousInput?.[i];
    const du = u.map((v, k) => (k === 0 ? (before == null ? NaN : v - before) : v - u[k - 1]));
    return { label: `Δ${name}`, role: 'signal', x: moveTimes, y: held(du), colour: i, stepped: true, unit: inUnits[i] };
  });
  const rateNames = inNames.map(n => `Δ${n}`);
  moveSeries.push(...limitSeries(model.limits.inputRateMin, rateNames, inUnits, 'limit-min', moveTimes));
  moveSeries.push(...limitSeries(model.limits.inputRateMax, rateNames, inUnits, 'limit-max', moveTimes));

  const what = kind === 'simulation' ? 'closed loop' : 'plan';
  const perSample = model.sampleTime >= 60 && model.sampleTime % 60 === 0 ? `${model.sampleTime / 60} min` : `${model.sampleTime} s`;
  return [
    figure(`${model.name}: outputs, ${what}`, 'outputs', xLabel, axis.unit, `output${axisUnit(outUnits)}`, outputSeries),
    figure(`${model.name}: inputs, ${what} (held between samples)`, 'inputs', xLabel, axis.unit, `input${axisUnit(inUnits)}`, inputSeries),
    figure(`${model.name}: input moves per sample (${perSample}) with rate limits`, 'moves', xLabel, axis.unit, `move${axisUnit(inUnits)}`, moveSeries),
  ];
}

function axisUnit(units) {
  const unit = sharedUnit(units);
  return unit ? ` (${unit})` : '';
}

/** The setpoint each stage of a plan tracked: the schedule's rows, the last held over the horizon. */
function planReferences(model, scenario, steps) {
  if (scenario.references.length === 0) {
    return null;
  }

  return Array.from({ length: steps }, (_, k) => (scenario.references.filter(r => r.fromStep <= k).at(-1) ?? scenario.references[0]).values);
}

function figure(title, id, xLabel, timeUnit, yLabel, series) {
  return { title, id, xLabel, timeUnit, yLabel, series, unitOf: s => s.unit ?? '' };
}

/** The figure on the page: chart, table beside it, CSV button and a note of soft-limit violations. */
export function renderFigure(spec, fileName) {
  const wrap = document.createElement('section');
  wrap.className = 'figure';
  wrap.dataset.figure = spec.id;
  wrap.appendChild(drawChart(spec));

  const side = document.createElement('div');
  side.className = 'side';
  const violations = spec.series.filter(s => s.role === 'signal' && s.limit).map(s => {
    const count = violationSpans(s).reduce((sum, [a, b]) => sum + (b - a + 1), 0);
    return count ? `${s.label}: ${count} sample${count === 1 ? '' : 's'} outside the soft limits` : null;
  }).filter(Boolean);
  if (violations.length) {
    const note = document.createElement('p');
    note.className = 'violation-note';
    note.textContent = violations.join('; ');
    side.appendChild(note);
  }

  const table = tableOf(spec);
  const button = document.createElement('button');
  button.type = 'button';
  button.textContent = `Download CSV (${spec.id})`;
  button.addEventListener('click', () => download(fileName, csvOf(spec)));
  side.append(button, table);
  wrap.appendChild(side);
  return wrap;
}

/** Columns: time, then every signal, setpoint and estimate (limits are constants, named in the legend). */
function columnsOf(spec) {
  const shown = spec.series.filter(s => !s.role.startsWith('limit'));
  const times = [...new Set(shown.flatMap(s => s.x))].sort((a, b) => a - b);
  const at = (s, t) => {
    const k = s.x.indexOf(t);
    return k < 0 ? NaN : s.y[k];
  };
  return { shown, times, at };
}

function tableOf(spec) {
  const { shown, times, at } = columnsOf(spec);
  const scroll = document.createElement('div');
  scroll.className = 'table-scroll';
  scroll.tabIndex = 0;
  scroll.setAttribute('role', 'region');
  scroll.setAttribute('aria-label', `${spec.title}, table`);
  const table = document.createElement('table');
  table.dataset.table = spec.id;
  const caption = document.createElement('caption');
  caption.textContent = spec.title;
  table.appendChild(caption);
  const head = table.createTHead().insertRow();
  for (const text of [spec.xLabel, ...shown.map(s => (s.unit ? `${s.label} (${s.unit})` : s.label))]) {
    const th = document.createElement('th');
    th.scope = 'col';
    th.textContent = text;
    head.appendChild(th);
  }

  const body = table.createTBody();
  for (const t of times) {
    const row = body.insertRow();
    const th = document.createElement('th');
    th.scope = 'row';
    th.textContent = formatNumber(t);
    row.appendChild(th);
    for (const s of shown) {
      row.insertCell().textContent = formatNumber(at(s, t));
    }
  }

  scroll.appendChild(table);
  return scroll;
}

/** Full precision, plain ASCII minus, empty cells for values a series does not have at that time. */
export function csvOf(spec) {
  const { shown, times, at } = columnsOf(spec);
  const quote = text => (/[",\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text);
  const lines = [[`time_${spec.timeUnit}`, ...shown.map(s => s.label)].map(quote).join(',')];
  for (const t of times) {
    lines.push([t, ...shown.map(s => at(s, t))].map(v => (Number.isFinite(v) ? String(v) : '')).join(','));
  }

  return lines.join('\n') + '\n';
}

function download(name, text) {
  const url = URL.createObjectURL(new Blob([text], { type: 'text/csv' }));
  const link = document.createElement('a');
  link.href = url;
  link.download = name;
  document.body.appendChild(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
