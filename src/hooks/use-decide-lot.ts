import { api } from '../api/client';
import type { LotDetail, LotDecision } from '../contracts/lots';
import { useSubmit } from './use-submit';

export const useDecideLot = (lotId: number) =>
  useSubmit((body: LotDecision) => api<LotDetail>(`/lots/${lotId}/decision`, { method: 'POST', body }), ['/lots', '/enzymes']);
