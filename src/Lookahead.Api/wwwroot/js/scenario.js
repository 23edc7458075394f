// The scenario form's text as request bodies for /plan, /estimate and /simulate (the fields the README documents).

/** "step: a, b, c" lines → [{ fromStep, values }], in the order given; blank lines are skipped. */
export function parseSchedule(text, width, what) {
  const rows = [];
  for (const [i, raw] of text.split('\n').entries()) {
    const line = raw.trim();
    if (!line) {
      continue;
    }

    const match = /^(\d+)\s*:\s*(.+)$/.exec(line);
    if (!match) {
      throw new Error(`${what}, line ${i + 1}: write "step: value, value, …"`);
    }

    const values = parseVector(match[2], width, `${what}, line ${i + 1}`);
    rows.push({ fromStep: Number(match[1]), values });
  }

  return rows;
}

export function parseVector(text, width, what) {
  const values = text.split(/[,;\s]+/).filter(t => t).map(t => Number(t.replace('−', '-')));
  if (values.length !== width || values.some(v => !Number.isFinite(v))) {
    throw new Error(`${what}: give ${width} number${width === 1 ? '' : 's'}`);
  }

  return values;
}

/** A schedule as per-stage rows for a plan: row k is the value from stage k on, the last row held to the end. */
export function scheduleRows(schedule, horizon) {
  if (schedule.length === 0) {
    return undefined;
  }

  const last = Math.min(Math.max(...schedule.map(s => s.fromStep)), horizon - 1);
  const rows = [];
  for (let k = 0; k <= last; k++) {
    const current = schedule.filter(s => s.fromStep <= k).at(-1) ?? schedule[0];
    rows.push(current.values);
  }

  return rows;
}

/** The true plant: the model's own (a, b) scaled, or undefined when both scales are 1. */
export function truePlant(model, scaleA, scaleB) {
  if (scaleA === 1 && scaleB === 1) {
    return undefined;
  }

  return {
    a: model.plant.a.map(row => row.map(v => v * scaleA)),
    b: model.plant.b.map(row => row.map(v => v * scaleB)),
    timeDomain: model.plant.timeDomain,
  };
}

/** Plan body from a state (or from an estimate the caller got first). */
export function planBody(model, scenario, estimate) {
  const body = {};
  if (estimate) {
    body.estimate = estimate;
  } else {
    body.state = scenario.start;
  }

  if (scenario.previousInput) {
    body.previousInput = scenario.previousInput;
  }

  const reference = scheduleRows(scenario.references, model.horizon);
  if (reference) {
    body.reference = reference;
  }

  const forecast = model.q > 0 ? scheduleRows(scenario.forecast, model.horizon) : undefined;
  if (forecast) {
    body.disturbance = forecast;
  }

  return body;
}

/** Estimate body that starts the estimator from a measurement with the inputs held now. */
export function estimateBody(model, scenario) {
  const body = { measurement: scenario.start, appliedInput: scenario.previousInput ?? model.operatingPoint.input };
  if (model.q > 0 && scenario.forecast.length > 0) {
    body.measuredDisturbance = scenario.forecast[0].values;
  }

  return body;
}

export function simulateBody(model, scenario, initialState, plant) {
  const body = { initialState, steps: scenario.steps };
  if (scenario.previousInput) {
    body.previousInput = scenario.previousInput;
  }

  if (scenario.references.length > 0) {
    body.references = scenario.references.map(r => ({ fromStep: r.fromStep, reference: r.values }));
  }

  if (model.q > 0 && scenario.forecast.length > 0) {
    body.measuredDisturbances = scenario.forecast.map(r => ({ fromStep: r.fromStep, disturbance: r.values }));
  }

  if (scenario.outputLoad.length > 0) {
    body.outputDisturbance = scenario.outputLoad.map(r => ({ fromStep: r.fromStep, offset: r.values }));
  }

  if (scenario.feedback === 'estimate') {
    body.feedback = 'estimate';
  }

  if (scenario.noise) {
    body.measurementNoise = { standardDeviation: scenario.noise, seed: scenario.seed };
  }

  if (plant) {
    body.truePlant = plant;
  }

  return body;
}
