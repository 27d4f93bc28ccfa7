/** Numbers for people: a fixed number of decimals, a thin space before units added by callers. */
export const fmt = (x: number, digits = 1) => (Number.isFinite(x) ? x.toFixed(digits) : '–');

/** `2026-11-28` as written; dates stay ISO so every site reads them the same. */
export const isoDate = (s: string) => s.slice(0, 10);

/** A typed number field's text as a number; blank or junk becomes NaN, which the API reports as "Enter a number". */
export const toNumber = (s: string) => (s.trim() === '' ? NaN : Number(s.replace(',', '.')));

/** An amount with its ISO 4217 code after it: `63 EUR`, `0.25 EUR`. The code, not a symbol: `$` names many currencies. */
export const money = (x: number, currency: string, digits = 2) => `${fmt(x, digits)} ${currency.toUpperCase()}`;
