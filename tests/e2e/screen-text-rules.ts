// Patterns over a screen's rendered text (innerText: one visible line per line) that a person cannot read
// unambiguously: a clock time with no zone, a raw ISO instant, an amount with no currency, an activity with no
// unit. Heuristic by nature: it checks what a pattern can see, and each rule names what it caught.

// A zone label after a clock time: an abbreviation (CET, UTC) or an offset (GMT+1, UTC+05:30).
const ZONE = String.raw`\s?(?:[A-Z]{2,5}|(?:GMT|UTC)[+\-−]\d{1,2}(?::\d{2})?)\b`;
const CLOCK = new RegExp(String.raw`(?<![\d:.])\d{1,2}:\d{2}(?::\d{2})?(?![\d:])(?!${ZONE})`);
const ISO_INSTANT = /\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/;
// A certificate thumbprint (hex pairs joined by colons, 44:F5:...:C0:80) is not a clock: its "0:80" would read as one.
const THUMBPRINT = /\b(?:[0-9A-F]{2}:){7,}[0-9A-F]{2}\b/g;
const CURRENCY = /\b[A-Z]{3}\b|[€$£¥]/;
const MONEY_WORD = /\b(profit|price|cost|amount|invoice|charged|total due|per kg)\b/i;
// Not a figure inside a code (YP-DEMO-0002, CGA-2605-11).
const NUMBER = /(?<![\w-])\d+(?:[.,]\d+)?/;
// Lines where a number is not money although a money word is near: counts and plain references.
const NOT_MONEY = /\b(seats?|invites?|people|h|°C|degC|%|lots?|batches|g\/L|kJ\/mol)\b/;

/** Each line of rendered text that breaks a rule, with the rule's name. */
export function unlabelledFigures(text: string): string[] {
  const lines = text
    .split('\n')
    .map((l) => l.trim())
    .filter(Boolean);
  const found: string[] = [];
  lines.forEach((line, i) => {
    if (CLOCK.test(line.replace(THUMBPRINT, ''))) found.push(`time without a zone: "${line}"`);
    if (ISO_INSTANT.test(line)) found.push(`raw ISO time: "${line}"`);
    // A money word labels its own line or the value on the next one (a figure's label above its value).
    if (MONEY_WORD.test(line)) {
      const value = NUMBER.test(line.replace(MONEY_WORD, '')) ? line : (lines[i + 1] ?? '');
      if (NUMBER.test(value) && !CURRENCY.test(value) && !CURRENCY.test(line) && !NOT_MONEY.test(value))
        found.push(`amount without a currency: "${line}${value === line ? '' : ` / ${value}`}"`);
    }
    if (/^Activity\b/.test(line)) {
      const value = NUMBER.test(line) ? line : (lines[i + 1] ?? '');
      if (/^\s*(Activity\s*)?\d+(?:[.,]\d+)?\s*$/.test(value)) found.push(`activity without a unit: "${line} ${value}"`);
    }
  });
  return found;
}
