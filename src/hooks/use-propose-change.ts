import { api } from '../api/client';
import { changeRequestsKey } from '../api/keys';
import type { ChangeRequestDetail, ChangeRequestInput } from '../contracts/change-requests';
import { useSubmit } from './use-submit';

export const useProposeChange = () =>
  useSubmit(
    (input: ChangeRequestInput) => api<ChangeRequestDetail>('/change-requests', { method: 'POST', body: input }),
    [changeRequestsKey(), changeRequestsKey('proposed')],
  );
