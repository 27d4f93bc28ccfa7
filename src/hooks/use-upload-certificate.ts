import { api } from '../api/client';
import type { CertificateFile } from '../contracts/lots';
import { useSubmit } from './use-submit';

export const useUploadCertificate = (lotId: number) =>
  useSubmit(
    (file: Blob, name: string) => {
      const form = new FormData();
      form.append('file', file, name);
      return api<CertificateFile>(`/lots/${lotId}/certificate`, { method: 'POST', body: form });
    },
    [`/lots/${lotId}`],
  );
