import type { Request, Response } from 'express';
import { describe, expect, it } from 'vitest';
import { fairTurns } from '../../server/middleware/fair-turns';

const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

describe('fairTurns', () => {
  it('starts at most the given number of requests per turn of the event loop, the rest later in arrival order', async () => {
    const gate = fairTurns(3);
    const started: number[] = [];
    for (let i = 0; i < 8; i++) gate({} as Request, {} as Response, () => started.push(i));
    expect(started).toEqual([0, 1, 2]);
    await nextTurn();
    expect(started).toEqual([0, 1, 2, 3, 4, 5]);
    await nextTurn();
    expect(started).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
  });

  it('lets a request through at once when the turn has room and nobody waits', async () => {
    const gate = fairTurns(2);
    let n = 0;
    gate({} as Request, {} as Response, () => n++);
    await nextTurn();
    await nextTurn();
    gate({} as Request, {} as Response, () => n++);
    gate({} as Request, {} as Response, () => n++);
    expect(n).toBe(3);
  });
});
