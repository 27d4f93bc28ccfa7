import type { RequestHandler } from 'express';
import { HttpError } from '../http-error';

// In `u` mode a surrogate pair is one code point, so this matches only a lone (unpaired) surrogate: text that
// cannot be written as UTF-8, which SQLite would store as invalid bytes and a signature could never cover.
const LONE_SURROGATE = /\p{Cs}/u;

/** The path (a.b.0) of the first string or key in `value` that is not well-formed Unicode, or null. */
export function firstIllFormed(value: unknown, path: string[] = []): string | null {
  if (typeof value === 'string') return LONE_SURROGATE.test(value) ? path.join('.') || '_' : null;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const found = firstIllFormed(value[i], [...path, String(i)]);
      if (found) return found;
    }
    return null;
  }
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      if (LONE_SURROGATE.test(k)) return [...path, k].join('.');
      const found = firstIllFormed(v, [...path, k]);
      if (found) return found;
    }
  }
  return null;
}

/** Refuses a JSON body, text body or query holding text that is not well-formed Unicode, naming the field. */
export const requireWellFormedText: RequestHandler = (req, _res, next) => {
  const field = firstIllFormed(req.body, typeof req.body === 'string' ? ['file'] : []) ?? firstIllFormed(req.query);
  if (!field) return next();
  next(
    new HttpError(400, 'invalid_input', 'Some text is not well-formed Unicode', {
      [field]: 'Contains a broken character (an unpaired surrogate); retype this text',
    }),
  );
};
