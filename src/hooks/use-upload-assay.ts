import { api } from '../api/client';
import { Assay, type AssayTableInput } from '../contracts/assays';
import { useSubmit } from './use-submit';

/** A picked CSV file (web: the browser File) or the editable table's rows. */
export const useUploadAssay = (lotId: number) =>
  useSubmit((input: { file: Blob; name: string } | AssayTableInput) => {
    if ('file' in input) {
      const form = new FormData();
      form.append('file', input.file, input.name);
      return api(`/lots/${lotId}/assays`, Assay, { method: 'POST', body: form });
    }
    return api(`/lots/${lotId}/assays`, Assay, { method: 'POST', body: input });
  }, ['/lots', '/enzymes']);
