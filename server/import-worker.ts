// The import worker: reads uploaded CSV and fits assays on its own thread, so a large file never holds up the
// server's other requests. Started by server/imports.ts; answers each task with its result or its HttpError.
import { parentPort } from 'node:worker_threads';
import { fitAssay } from '../src/assay-fit';
import { HttpError } from './http-error';
import { readAssayCsv, readAssayTable } from './services/assay-csv';
import { readHistorianCsv } from './services/historian-csv';
import { planImport } from './services/historian-plan';
import type { ImportMessage, ImportReply, ImportTask } from './imports';

async function run(task: ImportTask, progress: (bytesRead: number) => void) {
  switch (task.kind) {
    case 'assay-csv':
    case 'assay-table': {
      const checked = task.kind === 'assay-csv' ? await readAssayCsv(task.bytes, task.scale) : readAssayTable(task.input.rows, task.input.scale);
      const fit = fitAssay(
        task.tRefC,
        checked.points.map((p) => ({ c: p.tempC, h: p.timeH, residual: p.residual })),
      );
      return { value: { checked, fit }, transfer: [] };
    }
    case 'historian': {
      const parsed = await readHistorianCsv(task.bytes, { timeZone: task.timeZone, dateOrder: task.dateOrder, onProgress: progress });
      // Checks, order, deviation rules and status here too: the server's thread is left only the storing.
      const plan = planImport(parsed, task.basis);
      // Columns of numbers cross to the server thread without a copy.
      return { value: plan, transfer: [plan.atMs.buffer as ArrayBuffer, plan.c.buffer as ArrayBuffer] };
    }
  }
}

const port = parentPort!;
port.on('message', ({ id, task }: ImportMessage) => {
  let last = 0;
  const progress = (bytesRead: number) => {
    // A few updates a second are plenty for a progress bar.
    const now = Date.now();
    if (now - last < 200) return;
    last = now;
    port.postMessage({ id, progress: bytesRead } satisfies ImportReply);
  };
  run(task, progress).then(
    ({ value, transfer }) => port.postMessage({ id, result: value } satisfies ImportReply, transfer),
    (err: unknown) =>
      port.postMessage({
        id,
        error:
          err instanceof HttpError
            ? { status: err.status, code: err.code, message: err.message, fields: err.fields }
            : { status: 500, code: 'import_failed', message: String((err as Error)?.stack ?? err) },
      } satisfies ImportReply),
  );
});
