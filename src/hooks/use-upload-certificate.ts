import { api } from '../api/client';
import { CertificateFile } from '../contracts/lots';
import { useSubmit } from './use-submit';

export const useUploadCertificate = (lotId: number) =>
  useSubmit((file: Blob, name: string) => {
    const form = new FormData();
    form.append('file', file, name);
    return api(`/lots/${lotId}/certificate`, CertificateFile, { method: 'POST', body: form });
  }, [`/lots/${lotId}`]);
