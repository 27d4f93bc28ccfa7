// One worker thread for CSV reading and assay fitting (server/import-worker.ts), started on first use and kept.
// Imports queue for it in arrival order: the machine has few cores and the server's own thread must stay free.
// The byte limit is the upload's (checked while it streams in); the row limits are the readers'.
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import type { DateOrder } from '../src/batches';
import type { AssayTableInput, ResidualScale } from '../src/contracts/assays';
import type { AssayFitResult } from '../src/assay-fit';
import { HttpError } from './http-error';
import type { CheckedAssay } from './services/assay-csv';
import type { ImportBasis, ImportPlan } from './services/historian-plan';

export type ImportTask =
  | { kind: 'assay-csv'; bytes: Uint8Array; scale?: ResidualScale; tRefC: number }
  | { kind: 'assay-table'; input: AssayTableInput; tRefC: number }
  | { kind: 'historian'; bytes: Uint8Array; timeZone: string; dateOrder: DateOrder; basis: ImportBasis };

export type AssayRead = { checked: CheckedAssay; fit: AssayFitResult };
type ResultOf<T extends ImportTask> = T['kind'] extends 'historian' ? ImportPlan : AssayRead;

export type ImportMessage = { id: number; task: ImportTask };
export type ImportReply =
  | { id: number; progress: number }
  | { id: number; result: unknown }
  | { id: number; error: { status: number; code: string; message: string; fields?: Record<string, string> } };

type Pending = { resolve: (v: unknown) => void; reject: (e: unknown) => void; onProgress?: (bytesRead: number) => void };

// The worker loads TypeScript through tsx's require hook, whether the server runs under tsx or a test runner.
const BOOT = `require(${JSON.stringify(require.resolve('tsx/cjs/api'))}).register(); require(${JSON.stringify(path.join(__dirname, 'import-worker.ts'))});`;

let worker: Worker | null = null;
let nextId = 1;
const pending = new Map<number, Pending>();

function failAll(w: Worker, err: unknown) {
  if (worker === w) worker = null;
  for (const p of pending.values()) p.reject(err);
  pending.clear();
}

function started(): Worker {
  if (worker) return worker;
  const w = new Worker(BOOT, { eval: true });
  w.unref();
  w.on('message', (m: ImportReply) => {
    const p = pending.get(m.id);
    if (!p) return;
    if ('progress' in m) return p.onProgress?.(m.progress);
    pending.delete(m.id);
    if (pending.size === 0) w.unref();
    if ('result' in m) p.resolve(m.result);
    else p.reject(m.error.status === 500 ? new Error(m.error.message) : new HttpError(m.error.status, m.error.code, m.error.message, m.error.fields));
  });
  // A worker that dies fails the imports it held; the next import starts a new one.
  w.on('error', (err) => failAll(w, err));
  w.on('exit', (code) => failAll(w, new Error(`The import worker stopped (exit code ${code})`)));
  worker = w;
  return w;
}

/** Runs one import task on the worker thread; `onProgress` hears the bytes read so far. */
export function runImport<T extends ImportTask>(task: T, onProgress?: (bytesRead: number) => void): Promise<ResultOf<T>> {
  const w = started();
  const id = nextId++;
  return new Promise<ResultOf<T>>((resolve, reject) => {
    pending.set(id, { resolve: resolve as (v: unknown) => void, reject, onProgress });
    // Held while a task runs, so a process waiting for its import does not exit.
    w.ref();
    w.postMessage({ id, task } satisfies ImportMessage);
  });
}

/** Stops the worker (tests, shutdown); a later import starts a new one. */
export async function stopImports(): Promise<void> {
  const w = worker;
  worker = null;
  if (w) await w.terminate();
}
