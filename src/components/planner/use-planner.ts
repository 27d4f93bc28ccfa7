import { useCallback, useLayoutEffect, useMemo, useRef, useState } from 'react';
import type { PlanInputs, UncertaintySettings } from '../../contracts/plans';
import type { RecipeDetail } from '../../contracts/recipes';
import { DEFAULT_UNCERTAINTY, evaluatePlan, inputsFromRecipe, planContext, planReasons, planSeries, type PlanContext } from '../../planning';

/** The context of one accepted lot of the recipe, or null when the lot is not (or no longer) accepted. */
export function contextFor(detail: RecipeDetail, lotId: number): PlanContext | null {
  const lot = detail.lots.find((l) => l.id === lotId);
  return lot ? planContext(detail.recipe, detail.enzyme, lot, detail.vessel) : null;
}

/** The planner's state: inputs, the in-browser evaluation and charts, and how long a change took to redraw. */
export function usePlanner(detail: RecipeDetail) {
  const [inputs, setInputs] = useState<PlanInputs>(() => {
    const start = inputsFromRecipe(detail.recipe);
    // A recipe whose lot has since been rejected starts on an accepted one; the screen says so.
    const lotId = detail.lots.some((l) => l.id === start.lotId) ? start.lotId : (detail.lots[0]?.id ?? start.lotId);
    return { ...start, lotId };
  });
  const [settings, setSettings] = useState<UncertaintySettings>(DEFAULT_UNCERTAINTY);
  const changedAt = useRef<number | null>(null);
  const [redrawMs, setRedrawMs] = useState<number | null>(null);

  const ctx = useMemo(() => contextFor(detail, inputs.lotId), [detail, inputs.lotId]);
  const computed = useMemo(() => {
    if (!ctx) return null;
    // Timing the computation is impure by nature; the figure is shown as information and the memo keys on the inputs only.
    // eslint-disable-next-line react-hooks/purity -- see above
    const t0 = performance.now();
    const ev = evaluatePlan(ctx, inputs);
    const series = planSeries(ev, inputs);
    const reasons = planReasons(ev.outputs, series, inputs.batchH, inputs.turnaroundH);
    // eslint-disable-next-line react-hooks/purity -- see above
    return { ev, series, reasons, computeMs: performance.now() - t0 };
  }, [ctx, inputs]);

  // Runs after every child has rendered and committed: change -> computed -> charts drawn.
  useLayoutEffect(() => {
    if (changedAt.current === null) return;
    setRedrawMs(performance.now() - changedAt.current);
    changedAt.current = null;
  }, [inputs]);

  // Stable, so memoised fields skip re-rendering when only other inputs change.
  const update = useCallback((patch: Partial<PlanInputs>) => {
    changedAt.current = performance.now();
    setInputs((i) => ({ ...i, ...patch }));
  }, []);
  const updateSettings = useCallback((patch: Partial<UncertaintySettings>) => setSettings((s) => ({ ...s, ...patch })), []);
  return { inputs, update, settings, updateSettings, ctx, computed, redrawMs };
}

export type Planner = ReturnType<typeof usePlanner>;
