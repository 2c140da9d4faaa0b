/**
 * The answer card: a protocol answer (docs/protocol.md, "Answers") as a small readable block for cell
 * outputs of the MIME type `application/vnd.rhosigma.answer+json` (docs/surfaces.md, "MIME type"):
 * the op, the headline value (or the refusal with its code, message and path), the conventions the
 * answer states (logarithm base, fidelity squared with its root, the family and its parameters), the
 * reason of an infinite value, and an SDP's certificate status with its gap.
 *
 * Deliberately not here: any numerics (every number shown is a field of the answer, formatted), the
 * matrices of an answer (they stay in the JSON; Python has them). Cost: a few DOM nodes.
 */

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };
export type AnswerData = { [k: string]: Json };

function el<K extends keyof HTMLElementTagNameMap>(tag: K, cls: string, text?: string): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}

/** A number as the answer gives it: 10 significant digits, "∞" for the protocol's "Infinity". */
export function formatNumber(v: Json | undefined): string {
  if (v === 'Infinity') return '∞';
  if (v === '-Infinity') return '−∞';
  if (typeof v === 'number') {
    if (Number.isInteger(v) && Math.abs(v) < 1e15) return String(v);
    return Number(v.toPrecision(10)).toString();
  }
  if (typeof v === 'string') return v;
  if (v === undefined || v === null) return '—';
  return JSON.stringify(v);
}

function baseText(base: Json | undefined): string | null {
  if (base === undefined) return null;
  if (base === 'e') return 'log base e (nats)';
  if (base === 2) return 'log base 2 (bits)';
  return `log base ${formatNumber(base)}`;
}

/** The conventions an answer states, as short phrases (the card's second line; also text/plain's). */
export function conventions(answer: AnswerData, request?: AnswerData): string[] {
  const out: string[] = [];
  const b = baseText(answer.base ?? (answer.ok && hasLog(answer) ? (request?.base ?? 2) : undefined));
  if (b) out.push(b);
  if (typeof answer.family === 'string') out.push(`family ${answer.family}`);
  for (const k of ['alpha', 'z', 'epsilon'] as const) {
    const v = answer[k] ?? request?.[k];
    if (typeof v === 'number' || typeof v === 'string') out.push(`${k === 'alpha' ? 'α' : k === 'epsilon' ? 'ε' : 'z'} = ${formatNumber(v)}`);
  }
  if (answer.root !== undefined) out.push(`fidelity squared; root ${formatNumber(answer.root)}`);
  return out;
}

function hasLog(answer: AnswerData): boolean {
  return answer.base !== undefined;
}

interface CertificateSummary {
  status: string;
  gap?: string;
}

export function certificateOf(answer: AnswerData): CertificateSummary | null {
  const c = answer.certificate;
  if (!c || typeof c !== 'object' || Array.isArray(c)) return null;
  const status = typeof c.status === 'string' ? c.status : 'unknown';
  const gap = typeof c.relativeGap === 'number' ? `relative gap ${formatNumber(c.relativeGap)}` : undefined;
  return { status, gap };
}

/** Plain text of the same card, for tests and for other front ends. */
export function answerText(answer: AnswerData, request?: AnswerData): string {
  const op = typeof answer.op === 'string' ? answer.op : '(no op)';
  if (answer.ok !== true) {
    const e = (answer.error ?? {}) as { [k: string]: Json };
    const path = typeof e.path === 'string' ? ` at ${e.path}` : '';
    return `${op}: refused (${formatNumber(e.code)})${path}: ${formatNumber(e.message)}`;
  }
  const parts = [`${op} = ${formatNumber(answer.value)}`];
  const conv = conventions(answer, request);
  if (conv.length) parts.push(conv.join(', '));
  if (typeof answer.reason === 'string') parts.push(`reason: ${answer.reason}`);
  const cert = certificateOf(answer);
  if (cert) parts.push(`certificate ${cert.status}${cert.gap ? ` (${cert.gap})` : ''}`);
  return parts.join('; ');
}

/** Renders the card into `host` (emptied first). */
export function renderAnswerCard(host: HTMLElement, data: AnswerData): void {
  host.replaceChildren();
  const request = data.request && typeof data.request === 'object' && !Array.isArray(data.request) ? (data.request as AnswerData) : undefined;
  const card = el('div', 'rs-answer-card');
  card.dataset.ok = String(data.ok === true);
  const head = el('div', 'rs-answer-head');
  head.append(el('span', 'rs-answer-op', typeof data.op === 'string' ? data.op : '(no op)'));
  card.append(head);
  if (data.ok !== true) {
    const e = (data.error ?? {}) as { [k: string]: Json };
    const err = el('div', 'rs-answer-error');
    err.setAttribute('role', 'alert');
    err.append(el('span', 'rs-answer-code', formatNumber(e.code)), document.createTextNode(' ' + formatNumber(e.message)));
    if (typeof e.path === 'string') err.append(el('span', 'rs-answer-path', ` at ${e.path}`));
    card.append(err);
  } else {
    card.append(el('div', 'rs-answer-value', formatNumber(data.value)));
    const conv = conventions(data, request);
    if (conv.length) card.append(el('div', 'rs-answer-conventions', conv.join(' · ')));
    if (typeof data.reason === 'string') card.append(el('div', 'rs-answer-reason', data.reason));
    const cert = certificateOf(data);
    if (cert) {
      const c = el('div', 'rs-answer-certificate', `certificate: ${cert.status}${cert.gap ? ` · ${cert.gap}` : ''}`);
      c.dataset.status = cert.status;
      card.append(c);
    }
  }
  host.append(card);
}
