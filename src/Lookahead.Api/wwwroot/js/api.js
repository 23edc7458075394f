// Calls to the service's /v1 API from the page. The key lives in sessionStorage only: it leaves with the tab.
const KEY = 'lookahead.apiKey';

export function apiKey() {
  return sessionStorage.getItem(KEY) ?? '';
}

export function setApiKey(key) {
  if (key) {
    sessionStorage.setItem(KEY, key);
  } else {
    sessionStorage.removeItem(KEY);
  }
}

/** An answer that was not 2xx, with the problem document's fields ("errors": [{path, reason}]) when there is one. */
export class ApiError extends Error {
  constructor(status, problem) {
    const errors = (problem?.errors ?? []).map(e => `${e.path}: ${e.reason}`);
    const head = problem?.detail || problem?.title || `HTTP ${status}`;
    super(errors.length ? `${head} (${errors.join('; ')})` : head);
    this.status = status;
    this.problem = problem;
  }
}

async function call(method, path, body) {
  const headers = { Accept: 'application/json' };
  const key = apiKey();
  if (key) {
    headers.Authorization = `Bearer ${key}`;
  }

  if (body !== undefined) {
    headers['Content-Type'] = 'application/json';
  }

  const response = await fetch(path, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
  const text = await response.text();
  let json = null;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    json = null;
  }

  if (!response.ok) {
    throw new ApiError(response.status, json);
  }

  return json;
}

export const api = {
  models: (offset = 0, limit = 50) => call('GET', `/v1/models?offset=${offset}&limit=${limit}`),
  aliases: (offset = 0, limit = 50) => call('GET', `/v1/aliases?offset=${offset}&limit=${limit}`),
  stations: (offset = 0, limit = 50) => call('GET', `/v1/stations?offset=${offset}&limit=${limit}`),
  model: id => call('GET', `/v1/models/${encodeURIComponent(id)}`),
  alias: name => call('GET', `/v1/aliases/${encodeURIComponent(name)}`),
  plan: (id, body) => call('POST', `/v1/models/${encodeURIComponent(id)}/plan`, body),
  estimate: (id, body) => call('POST', `/v1/models/${encodeURIComponent(id)}/estimate`, body),
  simulate: (id, body) => call('POST', `/v1/models/${encodeURIComponent(id)}/simulate`, body),
};
