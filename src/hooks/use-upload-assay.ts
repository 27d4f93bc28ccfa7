import { api } from '../api/client';
import type { Assay, AssayTableInput } from '../contracts/assays';
import { useSubmit } from './use-submit';

/** A picked CSV file (web: the browser File) or the editable table's rows. */
export const useUploadAssay = (lotId: number) =>
  useSubmit(
    (input: { file: Blob; name: string } | AssayTableInput) => {
      if ('file' in input) {
        const form = new FormData();
        form.append('file', input.file, input.name);
        return api<Assay>(`/lots/${lotId}/assays`, { method: 'POST', body: form });
      }
      return api<Assay>(`/lots/${lotId}/assays`, { method: 'POST', body: input });
    },
    ['/lots', '/enzymes'],
  );
