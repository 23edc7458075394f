// The tuning page: pick one or two models, describe a scenario once, plan or simulate it on both, read the figures.
import { api, apiKey, setApiKey, ApiError } from './api.js';
import { describe } from './model.js';
import { parseSchedule, parseVector, truePlant, planBody, estimateBody, simulateBody } from './scenario.js';
import { figuresFor, renderFigure } from './figures.js';
import { formatNumber } from './numbers.js';

const $ = id => document.getElementById(id);
const PAGE = 20;
const offsets = { models: 0, aliases: 0, stations: 0 };
const catalogue = { models: [], aliases: [] };
const chosen = { a: null, b: null };

function say(text, isError = false) {
  $('status').textContent = text;
  $('status').classList.toggle('error', isError);
}

function explain(error) {
  if (error instanceof ApiError && error.status === 401) {
    return 'The service needs an API key: paste one above and choose “Use key”.';
  }

  if (error instanceof ApiError && error.status === 403) {
    return 'This key may not do that (it lacks the scope).';
  }

  return error.message;
}

// ---- catalogue ----

async function loadCatalogue() {
  say('Loading the catalogue…');
  try {
    // Each listing on its own: a key may read models and aliases without the scope stations need.
    const [models, aliases, stations] = await Promise.allSettled([
      api.models(offsets.models, PAGE), api.aliases(offsets.aliases, PAGE), api.stations(offsets.stations, PAGE)]);
    if (models.status === 'rejected') {
      throw models.reason;
    }

    const empty = { items: [], offset: 0, total: 0 };
    const aliasPage = aliases.status === 'fulfilled' ? aliases.value : empty;
    const stationPage = stations.status === 'fulfilled' ? stations.value : empty;
    catalogue.models = models.value.items;
    catalogue.aliases = aliasPage.items;
    renderList('models', models.value, m => `${m.name ?? '(no name)'} · ${m.id.slice(0, 12)} · n ${m.dimensions.n}, m ${m.dimensions.m}, p ${m.dimensions.p}, N ${m.dimensions.horizon}`, m => m.id);
    renderList('aliases', aliasPage, a => `${a.name} → ${a.modelId.slice(0, 12)}`, a => a.modelId, aliases.reason);
    renderList('stations', stationPage, s => `${s.name} → ${s.model}${s.modelId ? ` (${s.modelId.slice(0, 12)})` : ''}`, s => s.modelId, stations.reason);
    fillPickers();
    say(`${models.value.total} model(s), ${aliasPage.total} alias(es), ${stationPage.total} station(s).`);
    if (!chosen.a) {
      const first = aliasPage.items[0]?.modelId ?? models.value.items[0]?.id;
      if (first) {
        await choose('a', first);
      }
    }
  } catch (error) {
    say(explain(error), true);
  }
}

function renderList(kind, page, text, modelOf, refusal = null) {
  const list = $(kind);
  list.replaceChildren();
  if (page.items.length === 0) {
    const li = document.createElement('li');
    li.textContent = refusal ? `not shown: ${explain(refusal)}` : 'none';
    li.className = 'empty';
    list.appendChild(li);
  }

  for (const item of page.items) {
    const li = document.createElement('li');
    const label = document.createElement('span');
    label.textContent = text(item);
    li.appendChild(label);
    const id = modelOf(item);
    if (id) {
      for (const slot of ['a', 'b']) {
        const button = document.createElement('button');
        button.type = 'button';
        button.className = 'small';
        button.textContent = slot.toUpperCase();
        button.setAttribute('aria-label', `Use ${text(item)} as model ${slot.toUpperCase()}`);
        button.addEventListener('click', () => choose(slot, id));
        li.appendChild(button);
      }
    }

    list.appendChild(li);
  }

  const pager = $(`${kind}-pager`);
  pager.replaceChildren();
  if (page.total > PAGE) {
    const back = document.createElement('button');
    back.type = 'button';
    back.className = 'small';
    back.textContent = 'Previous';
    back.disabled = page.offset === 0;
    back.addEventListener('click', () => { offsets[kind] = Math.max(0, page.offset - PAGE); loadCatalogue(); });
    const next = document.createElement('button');
    next.type = 'button';
    next.className = 'small';
    next.textContent = 'Next';
    next.disabled = page.offset + PAGE >= page.total;
    next.addEventListener('click', () => { offsets[kind] = page.offset + PAGE; loadCatalogue(); });
    const where = document.createElement('span');
    where.textContent = `${page.offset + 1}–${Math.min(page.offset + PAGE, page.total)} of ${page.total}`;
    pager.append(back, where, next);
  }
}

function fillPickers() {
  for (const slot of ['a', 'b']) {
    const select = $(`model-${slot}`);
    const keep = chosen[slot]?.id ?? '';
    select.replaceChildren(new Option(slot === 'b' ? '(none)' : '(choose a model)', ''));
    for (const a of catalogue.aliases) {
      select.appendChild(new Option(`alias ${a.name} → ${a.modelId.slice(0, 12)}`, a.modelId));
    }

    for (const m of catalogue.models) {
      select.appendChild(new Option(`${m.name ?? '(no name)'} · ${m.id.slice(0, 12)}`, m.id));
    }

    if (keep && ![...select.options].some(o => o.value === keep)) {
      select.appendChild(new Option(`${chosen[slot].name} · ${keep.slice(0, 12)}`, keep));
    }

    select.value = keep;
  }
}

async function choose(slot, id) {
  if (!id) {
    chosen[slot] = null;
    renderDetails(slot);
    return;
  }

  try {
    chosen[slot] = describe(await api.model(id));
    fillPickers();
    renderDetails(slot);
    if (slot === 'a') {
      scenarioFromModel();
    }

    say(`Model ${slot.toUpperCase()}: ${chosen[slot].name}.`);
  } catch (error) {
    say(explain(error), true);
  }
}

// ---- model details ----

function renderDetails(slot) {
  const box = $(`details-${slot}`);
  box.replaceChildren();
  const model = chosen[slot];
  if (!model) {
    return;
  }

  const h = document.createElement('h3');
  h.textContent = `${slot.toUpperCase()}: ${model.name}`;
  const id = document.createElement('p');
  id.className = 'mono';
  id.textContent = model.id;
  box.append(h, id);

  const d = model.details.diagnostics;
  box.appendChild(definitions([
    ['dimensions', `n ${model.n} states, m ${model.m} inputs, p ${model.p} outputs, q ${model.q} measured disturbances, horizon ${model.horizon}`],
    ['sample time', `${model.sampleTime} s (${model.plant.timeDomain} plant)`],
    ['outputs', signalList(model.labels.outputs, model.units.outputs)],
    ['inputs', signalList(model.labels.inputs, model.units.inputs)],
    ['estimator', model.hasEstimator ? `${d.estimator?.disturbanceModel ?? ''} disturbances, spectral radius ${formatNumber(d.estimator?.spectralRadius)}` : 'none'],
    ['controllable', `${d.controllable ? 'yes' : 'no'} (rank ${d.controllabilityRank}); stabilisable ${d.stabilisable ? 'yes' : 'no'}; detectable ${d.detectable ? 'yes' : 'no'}`],
    ['spectral radius', `open loop ${formatNumber(d.openLoopSpectralRadius)}, closed loop ${formatNumber(d.closedLoopSpectralRadius)}`],
    ['Hessian condition', formatNumber(d.hessianCondition)],
    ['Riccati', d.riccatiIterations == null ? 'not used' : `${d.riccatiIterations} doublings, residual ${formatNumber(d.riccatiResidual)}`],
  ]));
  const warnings = model.details.warnings;
  const list = document.createElement('ul');
  list.className = 'warnings';
  for (const w of warnings) {
    const li = document.createElement('li');
    li.textContent = `${w.code}: ${w.message}`;
    list.appendChild(li);
  }

  const wh = document.createElement('h4');
  wh.textContent = warnings.length ? `Warnings (${warnings.length})` : 'No warnings';
  box.append(wh, list);
}

function signalList(names, units) {
  return names.map((n, i) => (units[i] ? `${n} (${units[i]})` : n)).join(', ');
}

function definitions(pairs) {
  const dl = document.createElement('dl');
  for (const [term, text] of pairs) {
    const dt = document.createElement('dt');
    dt.textContent = term;
    const dd = document.createElement('dd');
    dd.textContent = text;
    dl.append(dt, dd);
  }

  return dl;
}

// ---- scenario form ----

function vectorInputs(container, legend, names, units, values) {
  container.replaceChildren();
  const title = document.createElement('p');
  title.className = 'vector-title';
  title.textContent = legend;
  container.appendChild(title);
  names.forEach((name, i) => {
    const id = `${container.id}-${i}`;
    const label = document.createElement('label');
    label.htmlFor = id;
    label.textContent = units[i] ? `${name} (${units[i]})` : name;
    const input = document.createElement('input');
    input.id = id;
    input.type = 'number';
    input.step = 'any';
    input.value = String(values[i] ?? 0);
    const cell = document.createElement('div');
    cell.className = 'cell';
    cell.append(label, input);
    container.appendChild(cell);
  });
}

function readVector(container) {
  return [...container.querySelectorAll('input')].map(i => Number(i.value));
}

function line(step, values) {
  return `${step}: ${values.map(v => String(Number(v.toPrecision(6)))).join(', ')}`;
}

/** A starting scenario for the model: 1.5 above its operating point, setpoint lowered by 1 half-way through. */
function scenarioFromModel() {
  const model = chosen.a;
  if (!model) {
    return;
  }

  startInputs();
  vectorInputs($('previous-input'), 'Inputs held before the first move', model.labels.inputs, model.units.inputs, model.operatingPoint.input);
  const steps = Number($('steps').value) || 60;
  const later = Math.floor(steps / 2);
  $('references').value = [line(0, model.operatingPoint.output), line(later, model.operatingPoint.output.map(v => v - 1))].join('\n');
  $('forecast').value = model.q > 0 ? line(0, model.operatingPoint.disturbance) : '';
  $('forecast-field').hidden = model.q === 0;
  $('output-load').value = '';
  $('feedback').value = model.hasEstimator ? 'estimate' : 'state';
  $('feedback').querySelector('option[value=estimate]').disabled = !model.hasEstimator;
  $('start-from').querySelector('option[value=measurement]').disabled = !model.hasEstimator;
  $('noise').value = '';
}

function startInputs() {
  const model = chosen.a;
  if ($('start-from').value === 'measurement') {
    vectorInputs($('start-vector'), 'Measurement now', model.labels.outputs, model.units.outputs, model.operatingPoint.output.map(v => v + 1.5));
  } else {
    vectorInputs($('start-vector'), 'Initial state', model.labels.states, model.units.states, model.operatingPoint.state.map(v => v + 1.5));
  }
}

function readScenario(model) {
  const noiseText = $('noise').value.trim();
  return {
    from: $('start-from').value,
    start: readVector($('start-vector')),
    previousInput: readVector($('previous-input')),
    references: parseSchedule($('references').value, model.p, 'Setpoint schedule'),
    forecast: model.q > 0 ? parseSchedule($('forecast').value, model.q, 'Disturbance forecast') : [],
    outputLoad: parseSchedule($('output-load').value, model.p, 'Output load'),
    steps: Number($('steps').value),
    feedback: $('feedback').value,
    noise: noiseText ? parseVector(noiseText, model.p, 'Measurement noise') : null,
    seed: Number($('seed').value) || 0,
    scaleA: Number($('mismatch-a').value),
    scaleB: Number($('mismatch').value),
  };
}

async function runOne(kind, model, scenario, plant) {
  if (kind === 'plan') {
    let estimate;
    if (scenario.from === 'measurement') {
      estimate = (await api.estimate(model.id, estimateBody(model, scenario))).estimate;
    }

    return api.plan(model.id, planBody(model, scenario, estimate));
  }

  let initial = scenario.start;
  if (scenario.from === 'measurement') {
    initial = (await api.estimate(model.id, estimateBody(model, scenario))).estimate.state;
  }

  return api.simulate(model.id, simulateBody(model, scenario, initial, plant));
}

async function run(kind) {
  const models = [chosen.a, chosen.b].filter(Boolean);
  if (models.length === 0) {
    say('Choose a model first.', true);
    return;
  }

  let scenario;
  try {
    scenario = readScenario(chosen.a);
  } catch (error) {
    say(error.message, true);
    return;
  }

  const label = kind === 'plan' ? 'Planning' : 'Simulating';
  say(`${label}…`);
  // One true plant for both: model A's, scaled, so two tunings meet the same plant.
  const plant = truePlant(chosen.a, scenario.scaleA, scenario.scaleB);
  const answers = await Promise.allSettled(models.map(m => runOne(kind, m, scenario, plant)));
  const results = $('results');
  results.replaceChildren();
  results.dataset.kind = kind;
  const columns = document.createElement('div');
  columns.className = models.length > 1 ? 'compare two' : 'compare';
  answers.forEach((outcome, i) => {
    const model = models[i];
    const column = document.createElement('article');
    column.className = 'result';
    column.dataset.model = i === 0 ? 'a' : 'b';
    const h = document.createElement('h2');
    h.textContent = `${i === 0 ? 'A' : 'B'}: ${model.name}`;
    column.appendChild(h);
    if (outcome.status === 'rejected') {
      const p = document.createElement('p');
      p.className = 'error';
      p.textContent = explain(outcome.reason);
      column.appendChild(p);
    } else {
      column.appendChild(summaryOf(kind, outcome.value));
      const stem = `${model.name}-${kind}`;
      for (const spec of figuresFor(kind === 'plan' ? 'plan' : 'simulation', model, outcome.value, scenario)) {
        column.appendChild(renderFigure(spec, `${stem}-${spec.id}.csv`));
      }
    }

    columns.appendChild(column);
  });
  results.appendChild(columns);
  const failed = answers.filter(a => a.status === 'rejected').length;
  say(failed ? `${label} done; ${failed} of ${models.length} failed (see below).` : `${label} done.`, failed > 0);
}

function summaryOf(kind, answer) {
  const pairs = kind === 'plan'
    ? [['status', answer.status], ['cost', formatNumber(answer.cost)], ['solver iterations', String(answer.iterations ?? 0)], ['largest soft-limit excess', formatNumber(answer.maxOutputViolation ?? 0)]]
    : [['steps', String(answer.steps)], ['total cost', formatNumber(answer.totalCost)], ['steps not optimal', String(answer.nonOptimalSteps)]];
  const box = document.createElement('div');
  box.className = 'summary';
  box.appendChild(definitions(pairs));
  if (answer.warnings?.length) {
    const list = document.createElement('ul');
    list.className = 'warnings';
    for (const w of answer.warnings) {
      const li = document.createElement('li');
      li.textContent = `${w.code}: ${w.message}`;
      list.appendChild(li);
    }

    box.appendChild(list);
  }

  return box;
}

// ---- wiring ----

function wire() {
  $('api-key').value = apiKey();
  $('key-form').addEventListener('submit', event => {
    event.preventDefault();
    setApiKey($('api-key').value.trim());
    say(apiKey() ? 'Key kept for this tab.' : 'No key.');
    loadCatalogue();
  });
  $('key-clear').addEventListener('click', () => {
    setApiKey('');
    $('api-key').value = '';
    say('Key forgotten.');
  });
  $('reload').addEventListener('click', loadCatalogue);
  $('model-a').addEventListener('change', event => choose('a', event.target.value));
  $('model-b').addEventListener('change', event => choose('b', event.target.value));
  $('start-from').addEventListener('change', () => chosen.a && startInputs());
  $('reset-scenario').addEventListener('click', scenarioFromModel);
  $('scenario').addEventListener('submit', event => {
    event.preventDefault();
    run(event.submitter?.value === 'plan' ? 'plan' : 'simulate');
  });
}

wire();
loadCatalogue();
