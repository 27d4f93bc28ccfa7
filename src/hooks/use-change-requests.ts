import { changeRequestKey, changeRequestsKey } from '../api/keys';
import type { ChangeRequestDetail, ChangeRequestList, ChangeStatus } from '../contracts/change-requests';
import { useResource } from './use-resource';

export const useChangeRequests = (status?: ChangeStatus) => useResource<ChangeRequestList>(changeRequestsKey(status));

export const useChangeRequest = (id: number | null) => useResource<ChangeRequestDetail>(id ? changeRequestKey(id) : null);
