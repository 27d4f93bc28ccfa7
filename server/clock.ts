/** Time source, injected so tests can move it. */
export type Clock = { now(): Date };
export const systemClock: Clock = { now: () => new Date() };
