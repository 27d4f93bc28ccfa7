/**
 * Initialises the bundle's modules a few at a time, handing the main thread back to the browser between slices.
 * Metro runs each module the first time it is required (`inlineRequires`); left alone, the app's first render
 * requires about six hundred of them inside a handful of tasks that each block a phone for a third of a second.
 * Run first, this spreads the same work over short tasks, so a tap on the page is answered while the app starts.
 *
 * The build writes into each page the order to go in: every module after the modules it imports, so each step
 * runs one module (in Metro's numbering, the first module that imports `react-native` runs some two hundred in
 * one task).
 */
import { WARM_ORDER_ID } from './page';

type MetroRequire = ((id: number) => unknown) & { unguarded?: (id: number) => unknown };

const SLICE_MS = 4;
// Without the order (the development server), go up Metro's numbers until a run of unknown ones ends the bundle.
const END_AFTER_UNKNOWN = 32;

/** Hands the thread to the browser for one task; resolves with the time the next slice starts. */
function nextSlice(): Promise<number> {
  return new Promise((resolve) => {
    const channel = new MessageChannel();
    channel.port1.onmessage = () => resolve(performance.now());
    channel.port2.postMessage(null);
  });
}

function pageOrder(): number[] | null {
  if (typeof document === 'undefined') return null;
  try {
    const order: unknown = JSON.parse(document.getElementById(WARM_ORDER_ID)?.textContent ?? 'null');
    return Array.isArray(order) && order.every((id) => Number.isInteger(id)) ? (order as number[]) : null;
  } catch {
    return null;
  }
}

/** `skip`: modules that must not run early (the entry that renders the app). */
export async function warmUp(skip: ReadonlySet<number>, order: readonly number[] | null = pageOrder()): Promise<void> {
  const load = (globalThis as { __r?: MetroRequire }).__r?.unguarded;
  if (!load) return;
  /** Runs one module; false when the bundle has no module of that number. */
  const run = (id: number): boolean => {
    if (skip.has(id)) return true;
    try {
      load(id);
      return true;
    } catch (e) {
      // A module that fails here fails the same way when the app requires it, and is reported then.
      return !String((e as Error)?.message).startsWith('Requiring unknown module');
    }
  };
  let sliceStart = performance.now();
  const sliceOver = () => performance.now() - sliceStart > SLICE_MS;
  if (order) {
    for (const id of order) {
      run(id);
      if (sliceOver()) sliceStart = await nextSlice();
    }
    return;
  }
  for (let id = 0, unknownInARow = 0; unknownInARow < END_AFTER_UNKNOWN; id += 1) {
    unknownInARow = run(id) ? 0 : unknownInARow + 1;
    if (sliceOver()) sliceStart = await nextSlice();
  }
}
