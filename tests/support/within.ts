/** Polls `f` every `everyMs` until it is true, for up to `ms` (else throws); how long it took. */
export async function within(ms: number, f: () => boolean | Promise<boolean>, everyMs = 5): Promise<number> {
  const t0 = performance.now();
  while (!(await f())) {
    if (performance.now() - t0 > ms) throw new Error(`not within ${ms} ms`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
  return performance.now() - t0;
}
