import { HttpError } from './http-error';

/** Paths (a.b.0.c) of every number in `value` that is NaN or infinite. */
export function nonFinitePaths(value: unknown, path: string[] = []): string[] {
  if (typeof value === 'number') return Number.isFinite(value) ? [] : [path.join('.') || '_'];
  if (Array.isArray(value)) return value.flatMap((v, i) => nonFinitePaths(v, [...path, String(i)]));
  if (value && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => nonFinitePaths(v, [...path, k]));
  return [];
}

/**
 * Refuses, before anything is written, a computed record holding a number that is not finite: SQLite would store
 * Infinity (and JSON null), and every later read of the record would fail its contract.
 */
export function assertFiniteResult(value: unknown, what: string): void {
  const bad = nonFinitePaths(value);
  if (!bad.length) return;
  throw new HttpError(
    400,
    'not_computable',
    `These inputs give ${what} figures too large to compute (${bad.slice(0, 5).join(', ')}); nothing was saved. Check the prices, volumes and loads.`,
    {
      _: `Not a finite number: ${bad.slice(0, 5).join(', ')}`,
    },
  );
}
