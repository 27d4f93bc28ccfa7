import { api } from '../api/client';
import { keys } from '../api/keys';
import type { ImportResult, ImportQuery } from '../contracts/batches';
import { useSubmit } from './use-submit';

/** Uploads a historian export as text; the server parses it and reports problems by line. */
export const useImportReadings = (id: number) =>
  useSubmit(
    (csv: string, q: Partial<ImportQuery> = {}) =>
      api<ImportResult>(`/batches/${id}/readings/import?${new URLSearchParams(q as Record<string, string>)}`, {
        method: 'POST',
        body: csv,
        contentType: 'text/csv',
      }),
    [keys.batches],
  );
