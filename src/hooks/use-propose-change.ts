import { api } from '../api/client';
import { changeRequestsKey } from '../api/keys';
import { ChangeRequestDetail, type ChangeRequestInput } from '../contracts/change-requests';
import { useMutation } from './use-mutation';

export const useProposeChange = () =>
  useMutation((input: ChangeRequestInput) => api('/change-requests', ChangeRequestDetail, { method: 'POST', body: input }), [changeRequestsKey(), changeRequestsKey('proposed')]);
