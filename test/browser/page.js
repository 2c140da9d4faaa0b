// Script of the test page (index.html): starts the engine's worker (engine-worker.js, bundled by
// scripts/bundle-engine.mjs), exposes `runBatch(requests)` → Promise of { answers, eigh }, and lists each
// answer as one line (its id, op and headline value, or its error code). All compute is in the worker.
// Plain browser JavaScript, served as is; not part of the engine.
'use strict';

const worker = new Worker('engine-worker.js');
const pending = new Map();
let nextBatch = 1;

worker.onmessage = (event) => {
  const { batch } = event.data;
  const done = pending.get(batch);
  if (done) {
    pending.delete(batch);
    done.resolve(event.data);
  }
};
worker.onerror = (event) => {
  const message = `worker error: ${event.message}`;
  document.getElementById('status').textContent = message;
  for (const done of pending.values()) done.reject(new Error(message));
  pending.clear();
};

function summary(value) {
  if (typeof value === 'number') return String(Number(value.toPrecision(15)));
  if (typeof value === 'string') return value;
  if (Array.isArray(value)) {
    const flat = value.flat(2);
    const head = flat.slice(0, 3).map((x) => summary(x)).join(', ');
    return `[${head}${flat.length > 3 ? `, … (${flat.length} numbers)` : ''}]`;
  }
  if (value && typeof value === 'object' && 're' in value) return `{re, im} ${summary(value.re)}`;
  return JSON.stringify(value);
}

function render(requests, answers, eigh) {
  const list = document.getElementById('results');
  list.textContent = '';
  answers.forEach((a, k) => {
    const li = document.createElement('li');
    const name = document.createElement('span');
    name.className = 'op';
    const id = requests[k] && requests[k].id !== undefined ? ` (${requests[k].id})` : '';
    name.textContent = `${a.op}${id}`;
    li.append(name);
    if (a.ok) li.append(summary(a.value));
    else {
      li.className = 'fail';
      li.append(`error ${a.error.code}: ${a.error.message}`);
    }
    list.append(li);
  });
  document.getElementById('status').textContent =
    `${answers.length} answers; eigensolver: ${eigh.active ? 'WebAssembly SIMD kernels' : `TypeScript (${eigh.reason})`}`;
}

globalThis.runBatch = (requests) =>
  new Promise((resolve, reject) => {
    const batch = nextBatch++;
    pending.set(batch, { resolve, reject });
    worker.postMessage({ batch, requests });
  }).then((reply) => {
    render(requests, reply.answers, reply.eigh);
    return { answers: reply.answers, eigh: reply.eigh };
  });
