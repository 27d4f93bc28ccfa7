import { afterEach, describe, expect, it } from 'vitest';
import { warmUp } from '../../src/web/warm-up';

// A stand-in for Metro's module registry: `count` modules numbered from 0, some of them slow or failing.
function fakeMetro(count: number, opts: { failing?: number[]; slowMs?: number } = {}) {
  const loaded: number[] = [];
  const unguarded = (id: number) => {
    if (id >= count) throw new Error(`Requiring unknown module "${id}".`);
    if (opts.failing?.includes(id)) throw new Error('boom');
    const until = performance.now() + (opts.slowMs ?? 0);
    while (performance.now() < until) {
      /* a module whose initialisation takes a while */
    }
    loaded.push(id);
  };
  (globalThis as { __r?: unknown }).__r = Object.assign(() => undefined, { unguarded });
  return loaded;
}

describe('warming up the bundle in slices', () => {
  afterEach(() => {
    delete (globalThis as { __r?: unknown }).__r;
  });

  it('runs every module once in the order the page gives, except the skipped entry', async () => {
    const loaded = fakeMetro(300, { failing: [7] });
    const order = [...Array(300).keys()].reverse();
    await warmUp(new Set([2, 3]), order);
    expect(loaded).toEqual(order.filter((id) => ![2, 3, 7].includes(id)));
  });

  it('without the count, goes up until the numbers run out, carrying on past a skipped or failing module', async () => {
    const loaded = fakeMetro(300, { failing: [7] });
    await warmUp(new Set([2, 3]), null);
    expect(loaded).toEqual([...Array(300).keys()].filter((id) => ![2, 3, 7].includes(id)));
  });

  it('hands the thread back between slices, so other tasks run while it works', async () => {
    fakeMetro(60, { slowMs: 1 });
    let otherTasks = 0;
    const timer = setInterval(() => (otherTasks += 1), 0);
    await warmUp(new Set(), [...Array(60).keys()]);
    clearInterval(timer);
    expect(otherTasks).toBeGreaterThan(3);
  });

  it('does nothing outside a Metro bundle', async () => {
    await expect(warmUp(new Set(), [1, 2])).resolves.toBeUndefined();
  });
});
