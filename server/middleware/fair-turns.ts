import type { RequestHandler } from 'express';

/**
 * Starts at most `perTurn` requests per turn of the event loop; later ones wait, in arrival order, for the next
 * turns. Since libuv 1.45 (Node 20) the server accepts one new connection per turn, so under full load a turn
 * that handles every ready request (a few hundred ms at 200 busy connections) leaves new connections waiting in
 * the kernel's queue for seconds, until their clients time out. Short turns keep accepting them.
 */
export function fairTurns(perTurn: number): RequestHandler {
  const waiting: (() => void)[] = [];
  let started = 0;
  let scheduled = false;
  const schedule = () => {
    if (scheduled) return;
    scheduled = true;
    setImmediate(turn);
  };
  function turn() {
    scheduled = false;
    started = 0;
    while (started < perTurn && waiting.length) {
      started++;
      waiting.shift()!();
    }
    // A new turn begins after the next poll for I/O; the count resets then.
    if (started) schedule();
  }
  return (_req, _res, next) => {
    if (started < perTurn && !waiting.length) {
      started++;
      schedule();
      return next();
    }
    waiting.push(() => next());
    schedule();
  };
}
