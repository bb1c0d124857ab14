import { sourceMappedStack } from './source-mapped-stack';

/** Minimal structured logging to stdout/stderr; quiet in tests unless something fails on the server. */
const quiet = () => process.env.CRISTAE_QUIET === '1';

export function logInfo(message: string, extra: Record<string, unknown> = {}): void {
  if (quiet()) return;
  console.log(JSON.stringify({ level: 'info', at: new Date().toISOString(), message, ...extra }));
}

/** Something an operator should fix; printed even when quiet. */
export function logWarn(message: string, extra: Record<string, unknown> = {}): void {
  console.warn(JSON.stringify({ level: 'warn', at: new Date().toISOString(), message, ...extra }));
}

export function logError(err: unknown, context: string): void {
  const detail =
    err instanceof Error
      ? { name: err.name, message: err.message, stack: err.stack && sourceMappedStack(err.stack) }
      : { value: String(err) };
  console.error(JSON.stringify({ level: 'error', at: new Date().toISOString(), context, ...detail }));
}
