import { api } from '../api/client';
import { changeRequestKey, changeRequestsKey, keys } from '../api/keys';
import { ChangeRequestDetail, type SignatureInput } from '../contracts/change-requests';
import { useMutation } from './use-mutation';

/** Signs a change request; an approval also changes the recipe, so its list is read again. */
export const useSignChange = (id: number) =>
  useMutation(
    (input: SignatureInput) => api(`/change-requests/${id}/signatures`, ChangeRequestDetail, { method: 'POST', body: input }),
    [changeRequestKey(id), changeRequestsKey(), changeRequestsKey('proposed'), keys.recipes],
  );
