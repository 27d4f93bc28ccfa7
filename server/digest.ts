import crypto, { type BinaryToTextEncoding } from 'node:crypto';

/** SHA-256 of text (UTF-8) or bytes; hex unless another encoding is asked for. */
export const sha256 = (data: string | Uint8Array, encoding: BinaryToTextEncoding = 'hex'): string => crypto.createHash('sha256').update(data).digest(encoding);

/** JSON with object keys sorted at every level, so the same content always gives the same text and hash. */
export function canonicalJson(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonicalJson).join(',')}]`;
  if (v && typeof v === 'object')
    return `{${Object.keys(v)
      .sort()
      .filter((k) => (v as Record<string, unknown>)[k] !== undefined)
      .map((k) => `${JSON.stringify(k)}:${canonicalJson((v as Record<string, unknown>)[k])}`)
      .join(',')}}`;
  return JSON.stringify(v);
}
