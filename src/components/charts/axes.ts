// Shared pieces of chart geometry: the plotting box and ticks placed by a scale.

export type Box = { width: number; height: number; left: number; right: number; top: number; bottom: number };
export type Tick = { value: number; pos: number; label: string };

/** The plotting box inside a chart of the given size; margins leave room for tick labels. */
export function plotBox(width: number, height: number): Box {
  return { width, height, left: 48, right: width - 12, top: 28, bottom: height - 36 };
}

/** Ticks from a d3 scale, placed and labelled. */
export function ticksOf(scale: { ticks(n?: number): number[]; (v: number): number | undefined }, count: number, label: (v: number) => string): Tick[] {
  return scale.ticks(count).map((value) => ({ value, pos: scale(value) ?? 0, label: label(value) }));
}

/** A trimmed number for a tick label: no trailing zeros, at most three significant digits. */
export const tickLabel = (v: number) => String(Number(v.toPrecision(3)));
