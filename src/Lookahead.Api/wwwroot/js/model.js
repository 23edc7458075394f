// What the page needs to know about a model, read once from GET /v1/models/{id}: sizes, names, units, limits and
// the operating point, with the fallbacks the service itself uses (y1…, u1…) when the document has no labels.

function names(given, prefix, count) {
  return Array.from({ length: count }, (_, i) => given?.[i] ?? `${prefix}${i + 1}`);
}

function units(given, count) {
  return Array.from({ length: count }, (_, i) => given?.[i] ?? '');
}

export function describe(details) {
  const doc = details.document;
  const { n, m, p, horizon } = details.dimensions;
  const q = doc.plant.e?.[0]?.length ?? 0;
  const labels = doc.labels ?? {};
  const op = doc.operatingPoint ?? {};
  const limits = doc.limits ?? {};
  return {
    id: details.id,
    name: doc.name ?? details.id.slice(0, 12),
    details,
    n, m, p, q, horizon,
    sampleTime: doc.plant.sampleTime,
    plant: doc.plant,
    hasEstimator: Boolean(doc.estimator),
    labels: {
      states: names(labels.states, 'x', n),
      inputs: names(labels.inputs, 'u', m),
      outputs: names(labels.outputs, 'y', p),
      disturbances: names(labels.disturbances, 'v', q),
    },
    units: {
      states: units(labels.units?.states, n),
      inputs: units(labels.units?.inputs, m),
      outputs: units(labels.units?.outputs, p),
      disturbances: units(labels.units?.disturbances, q),
    },
    operatingPoint: {
      state: op.state ?? Array(n).fill(0),
      input: op.input ?? Array(m).fill(0),
      output: op.output ?? Array(p).fill(0),
      disturbance: op.disturbance ?? Array(q).fill(0),
    },
    limits: {
      inputMin: limits.inputMin ?? [],
      inputMax: limits.inputMax ?? [],
      inputRateMin: limits.inputRateMin ?? [],
      inputRateMax: limits.inputRateMax ?? [],
      outputMin: limits.outputMin ?? [],
      outputMax: limits.outputMax ?? [],
    },
  };
}

/** "°C" when every signal shares one unit, "°C, %" when they differ, "" without units. */
export function sharedUnit(list) {
  return [...new Set(list.filter(u => u))].join(', ');
}
