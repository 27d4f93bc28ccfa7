import { api } from '../api/client';
import type { Lot, LotInput } from '../contracts/lots';
import { useSubmit } from './use-submit';

export const useCreateLot = () => useSubmit((body: LotInput) => api<Lot>('/lots', { method: 'POST', body }), ['/lots', '/enzymes']);
