import { api } from '../api/client';
import { changeRequestsKey } from '../api/keys';
import type { ChangeRequestDetail, ChangeRequestInput } from '../contracts/change-requests';
import { useMutation } from './use-mutation';

export const useProposeChange = () =>
  useMutation((input: ChangeRequestInput) => api<ChangeRequestDetail>('/change-requests', { method: 'POST', body: input }), [changeRequestsKey(), changeRequestsKey('proposed')]);
