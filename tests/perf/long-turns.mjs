// Preloaded into the server by `npm run load` (node --import): records each turn of the server's event loop that
// held it for more than 20 ms, as "epoch-ms held-ms" lines in LOAD_TURNS_FILE. A 5 ms timer that fires late
// was held up by the turn before it (or, on a busy machine, by the scheduler: compare with the CPU time).
import fs from 'node:fs';

const file = process.env.LOAD_TURNS_FILE;
const TICK_MS = 5;
if (file) {
  let last = performance.now();
  setInterval(() => {
    const now = performance.now();
    const held = now - last - TICK_MS;
    last = now;
    if (held > 20) fs.appendFileSync(file, `${Date.now()} ${held.toFixed(1)}\n`);
  }, TICK_MS).unref();
}
