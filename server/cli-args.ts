/** `--key=value` arguments of a command; the value is everything after the first `=` (a password may hold more). */
export function cliArgs(argv: readonly string[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const a of argv) {
    const m = /^--([^=]+)=([\s\S]*)$/.exec(a);
    if (m) out[m[1]!] = m[2]!;
  }
  return out;
}
