import { api } from '../api/client';
import { LotDetail, type LotDecision } from '../contracts/lots';
import { useSubmit } from './use-submit';

export const useDecideLot = (lotId: number) =>
  useSubmit((body: LotDecision) => api(`/lots/${lotId}/decision`, LotDetail, { method: 'POST', body }), ['/lots', '/enzymes']);
