/** Resolves on the event loop's next turn, after the I/O that waits: long work yields with it between its parts. */
export const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));
