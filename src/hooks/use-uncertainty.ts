import { useCallback, useEffect, useRef, useState } from 'react';
import { monteCarloSteps, type UncertaintyInput, type UncertaintyResult } from '../model/uncertainty';

export type UncertaintyRun =
  | { status: 'idle' }
  | { status: 'running'; progress: number; key: string }
  | { status: 'done'; result: UncertaintyResult; key: string; ms: number }
  | { status: 'cancelled' }
  | { status: 'failed'; message: string };

// Work for about one frame, then hand the thread back so the page stays responsive and Cancel is heard.
const SLICE_MS = 12;

/** Runs the Monte Carlo in slices on a setTimeout loop, with progress and cancel; `key` ties a result to its inputs. */
export function useUncertainty() {
  const [run, setRun] = useState<UncertaintyRun>({ status: 'idle' });
  const token = useRef(0);
  useEffect(() => () => void (token.current += 1), []);

  const start = useCallback((input: UncertaintyInput, key: string) => {
    const mine = ++token.current;
    const it = monteCarloSteps(input, 200);
    const began = performance.now();
    setRun({ status: 'running', progress: 0, key });
    const step = () => {
      if (token.current !== mine) return;
      try {
        const t0 = performance.now();
        let r = it.next();
        while (!r.done && performance.now() - t0 < SLICE_MS) r = it.next();
        if (r.done) setRun({ status: 'done', result: r.value, key, ms: performance.now() - began });
        else {
          setRun({ status: 'running', progress: r.value, key });
          setTimeout(step, 0);
        }
      } catch (e) {
        setRun({ status: 'failed', message: e instanceof Error ? e.message : String(e) });
      }
    };
    setTimeout(step, 0);
  }, []);

  const cancel = useCallback(() => {
    token.current += 1;
    setRun({ status: 'cancelled' });
  }, []);

  return { run, start, cancel };
}
