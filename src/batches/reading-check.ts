// What a new reading is checked against before it is stored, and what stored readings do to the forecast.

/**
 * A step between two readings above this asks for a second look. Common practice, no source: a jacketed vessel
 * moves a few °C between readings half an hour apart, so a step of 10 °C or more is more often a typing slip
 * (59 -> 95) than the reactor.
 */
export const READING_JUMP_C = 10;

type Range = { name: string; minC: number; maxC: number };

/** Why a typed reading deserves a second look before it is stored, or null. */
export function readingCaution(c: number, vessel: Range, lastC: number | null): string | null {
  if (c > vessel.maxC) return `${c.toFixed(1)} °C is above ${vessel.name}’s maximum of ${vessel.maxC.toFixed(1)} °C.`;
  if (c < vessel.minC) return `${c.toFixed(1)} °C is below ${vessel.name}’s minimum of ${vessel.minC.toFixed(1)} °C.`;
  if (lastC !== null && Math.abs(c - lastC) >= READING_JUMP_C)
    return `${c.toFixed(1)} °C is ${Math.abs(c - lastC).toFixed(1)} °C from the last reading of ${lastC.toFixed(1)} °C.`;
  return null;
}

const MINUTE_H = 1 / 60;

/**
 * How the readings count in the forecast, in words: the engine draws a straight line from each reading to the
 * next (src/model temperatureAt of a log), so a reading stands for the time until the next one, and after the
 * last reading the plan is assumed. Readings less than a minute apart make a spike of almost no duration, which
 * still counts for its seconds (a hot enough spike can cost activity). With `forecast`, each spike's effect is
 * given as the forecast with and without it. `readings` sorted by h (batch hours).
 */
export function readingsExplained<R extends { h: number; c: number }>(readings: readonly R[], forecast?: (rs: readonly R[]) => number): string[] {
  if (!readings.length) return ['No readings yet: the forecast is the plan.'];
  const lines = [
    'The forecast draws a straight line from each reading to the next, so a reading counts for the time until the next one; after the last reading it assumes the plan.',
  ];
  const last = readings[readings.length - 1]!;
  lines.push(`The last reading, ${last.c.toFixed(1)} °C, counts for no time until the next one is logged.`);
  // Runs of readings each less than a minute after the one before.
  let run = 1;
  const spikes: { n: number; maxC: number; minC: number; from: number }[] = [];
  for (let i = 1; i <= readings.length; i++) {
    if (i < readings.length && readings[i]!.h - readings[i - 1]!.h < MINUTE_H) {
      run++;
      continue;
    }
    if (run > 1) {
      const group = readings.slice(i - run, i);
      spikes.push({ n: run, maxC: Math.max(...group.map((r) => r.c)), minC: Math.min(...group.map((r) => r.c)), from: i - run });
    }
    run = 1;
  }
  for (const s of spikes) {
    let effect = '';
    if (forecast) {
      // Without the spike: its first reading stays, the others in the minute go.
      const without = readings.filter((_, i) => i <= s.from || i >= s.from + s.n);
      effect = ` Forecast ${forecast(readings).toFixed(1)} g/L with them, ${forecast(without).toFixed(1)} g/L with only the first.`;
    }
    lines.push(
      `${s.n} readings within one minute (${s.minC.toFixed(1)}–${s.maxC.toFixed(1)} °C) make a spike of almost no duration: it counts only for those seconds.${effect}`,
    );
  }
  return lines;
}
