import type { BatchSettings, DeviationKind } from '../contracts/batches';

export type Point = { h: number; c: number };

/** Kinds whose cause an operator can correct with the temperature: these get a corrective setpoint. */
export const CORRECTABLE: ReadonlySet<DeviationKind> = new Set<DeviationKind>(['band', 'vessel_max', 'forecast_low']);

export type DeviationDraft = { kind: DeviationKind; h: number; valueC: number | null; expectedC: number | null; message: string };

export type ReadingRules = BatchSettings & {
  vesselMaxC: number;
  /** Planned temperature at batch time h, degC. */
  plannedAt: (h: number) => number;
};

const c1 = (x: number) => `${x.toFixed(1)} °C`;
const outOfBand = (r: ReadingRules, p: Point) => Math.abs(p.c - r.plannedAt(p.h)) > r.toleranceC + 1e-9;
const aboveMax = (r: ReadingRules, p: Point) => p.c > r.vesselMaxC;

function gapText(hours: number) {
  const min = Math.round(hours * 60);
  return min >= 120 ? `${hours.toFixed(1)} h` : `${min} min`;
}

/**
 * Deviations one reading raises, given the reading before it in time (null for the first; the gap then counts
 * from the batch start). An excursion raises one deviation when it begins, not one per reading inside it; a
 * reading above the vessel's maximum raises that, which says more than being outside the band.
 */
export function readingDeviations(rules: ReadingRules, prev: Point | null, p: Point): DeviationDraft[] {
  const out: DeviationDraft[] = [];
  const gapH = p.h - (prev ? prev.h : 0);
  if (gapH * 60 > rules.gapLimitMin + 1e-9)
    out.push({
      kind: 'gap',
      h: p.h,
      valueC: null,
      expectedC: null,
      message: `${gapText(gapH)} without a reading ${prev ? 'since the previous one' : 'since the start'}; the site's limit is ${rules.gapLimitMin} min.`,
    });
  const expected = rules.plannedAt(p.h);
  if (aboveMax(rules, p)) {
    if (!prev || !aboveMax(rules, prev))
      out.push({
        kind: 'vessel_max',
        h: p.h,
        valueC: p.c,
        expectedC: expected,
        message: `${c1(p.c)} is above the vessel's maximum of ${c1(rules.vesselMaxC)}.`,
      });
  } else if (outOfBand(rules, p) && (!prev || !outOfBand(rules, prev) || aboveMax(rules, prev))) {
    const diff = p.c - expected;
    out.push({
      kind: 'band',
      h: p.h,
      valueC: p.c,
      expectedC: expected,
      message: `${c1(p.c)} is ${c1(Math.abs(diff))} ${diff > 0 ? 'above' : 'below'} the planned ${c1(expected)}; the band is ±${c1(rules.toleranceC)}.`,
    });
  }
  return out;
}

/**
 * The deviation rules over new readings merged into the stored ones (both sorted by h), fed a piece at a time:
 * each call takes the next readings of the run and answers their deviations, indexed in the whole run.
 */
export function deviationRun(rules: ReadingRules, stored: readonly Point[]): (added: readonly Point[]) => { index: number; draft: DeviationDraft }[] {
  let i = 0;
  let n = 0;
  let prev: Point | null = null;
  return (added) => {
    const out: { index: number; draft: DeviationDraft }[] = [];
    for (const p of added) {
      while (i < stored.length && stored[i].h <= p.h) prev = stored[i++];
      for (const draft of readingDeviations(rules, prev, p)) out.push({ index: n, draft });
      prev = p;
      n++;
    }
    return out;
  };
}

/** Deviations of a run of new readings merged into the stored ones (both sorted by h). */
export const runDeviations = (rules: ReadingRules, stored: readonly Point[], added: readonly Point[]) => deviationRun(rules, stored)(added);

/** A forecast below the plan's P10 raises one deviation until it is closed; plans without a P10 never do. */
export function forecastDeviation(p10GPerL: number | null, forecastGPerL: number, hasActive: boolean, h: number): DeviationDraft | null {
  if (p10GPerL === null || hasActive || !(forecastGPerL < p10GPerL)) return null;
  return {
    kind: 'forecast_low',
    h,
    valueC: null,
    expectedC: null,
    message: `The forecast of ${forecastGPerL.toFixed(1)} g/L at the end is below the plan's P10 of ${p10GPerL.toFixed(1)} g/L.`,
  };
}

/**
 * The control-system link gave no good value for longer than the site's gap limit: raised at the last good
 * value's batch time (or the link's start, `sinceH`), with why (bad status, disconnected, stale).
 */
export function signalLostDeviation(gapLimitMin: number, sinceH: number, nowH: number, why: string): DeviationDraft | null {
  const silentMin = (nowH - sinceH) * 60;
  if (!(silentMin > gapLimitMin + 1e-9)) return null;
  return {
    kind: 'signal_lost',
    h: sinceH,
    valueC: null,
    expectedC: null,
    message: `No good value from the control system for ${gapText(nowH - sinceH)} (${why}); the site's limit is ${gapLimitMin} min. Log readings by hand until the link is back.`,
  };
}
