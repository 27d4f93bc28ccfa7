import { changeRequestKey, changeRequestsKey } from '../api/keys';
import { ChangeRequestDetail, ChangeRequestList, type ChangeStatus } from '../contracts/change-requests';
import { useResource } from './use-resource';

export const useChangeRequests = (status?: ChangeStatus) => useResource(changeRequestsKey(status), ChangeRequestList);

export const useChangeRequest = (id: number | null) => useResource(id ? changeRequestKey(id) : null, ChangeRequestDetail);
