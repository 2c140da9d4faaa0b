/**
 * The engine as the embed sees it: the contract of docs/surfaces.md ("The engine client"), which the
 * page's one worker client (src/worker/client.ts) fulfils. Types only: the embed never imports the engine.
 */
export interface Answer {
  ok: boolean;
  op: string | null;
  value?: unknown;
  error?: { code: string; message: string; path?: string };
  [field: string]: unknown;
}

export interface ComputeOptions {
  onProgress?: (p: unknown) => void;
  signal?: AbortSignal;
  key?: string;
}

export interface EngineLike {
  compute(request: object, options?: ComputeOptions): Promise<Answer>;
}

/** What a calculator's `result` event carries (docs/surfaces.md, "UI components"). */
export interface ResultEvent {
  request: Record<string, unknown>;
  answer: Answer;
}
