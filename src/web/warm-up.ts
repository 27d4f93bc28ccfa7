/**
 * Initialises the bundle's modules a few at a time, handing the main thread back to the browser between slices.
 * Metro runs each module the first time it is required (`inlineRequires`); left alone, the app's first render
 * requires about six hundred of them inside a handful of tasks that each block a phone for a third of a second.
 * Run first, this spreads the same work over short tasks, so a tap on the page is answered while the app starts.
 */
type MetroRequire = ((id: number) => unknown) & { unguarded?: (id: number) => unknown };

const SLICE_MS = 4;
// Metro numbers modules from 0 in the order it meets them; a run of unknown numbers is the end of the bundle.
const END_AFTER_UNKNOWN = 32;

function nextTask(): Promise<void> {
  return new Promise((resolve) => {
    const channel = new MessageChannel();
    channel.port1.onmessage = () => resolve();
    channel.port2.postMessage(null);
  });
}

/** `skip`: modules that must not run early (the entry that renders the app). */
export async function warmUp(skip: ReadonlySet<number>): Promise<void> {
  const metro = (globalThis as { __r?: MetroRequire }).__r;
  const load = metro?.unguarded;
  if (!load) return;
  let unknownInARow = 0;
  let sliceStart = performance.now();
  for (let id = 0; unknownInARow < END_AFTER_UNKNOWN; id += 1) {
    if (skip.has(id)) continue;
    try {
      load(id);
      unknownInARow = 0;
    } catch (e) {
      // A module that fails here fails the same way when the app requires it, and is reported then.
      unknownInARow = String((e as Error)?.message).startsWith('Requiring unknown module') ? unknownInARow + 1 : 0;
    }
    if (performance.now() - sliceStart > SLICE_MS) {
      await nextTask();
      sliceStart = performance.now();
    }
  }
}
