export const STRICT_CSP: string;
export interface StaticServer { url: string; requests: string[]; close(): Promise<void> }
export function serveStatic(dir: string, options?: { port?: number; csp?: string | null }): Promise<StaticServer>;
