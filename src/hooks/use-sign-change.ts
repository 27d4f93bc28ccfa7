import { api } from '../api/client';
import { changeRequestKey, changeRequestsKey, keys } from '../api/keys';
import type { ChangeRequestDetail, SignatureInput } from '../contracts/change-requests';
import { useSubmit } from './use-submit';

/** Signs a change request; an approval also changes the recipe, so its list is read again. */
export const useSignChange = (id: number) =>
  useSubmit(
    (input: SignatureInput) => api<ChangeRequestDetail>(`/change-requests/${id}/signatures`, { method: 'POST', body: input }),
    [changeRequestKey(id), changeRequestsKey(), changeRequestsKey('proposed'), keys.recipes],
  );
