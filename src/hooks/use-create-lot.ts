import { api } from '../api/client';
import { Lot, type LotInput } from '../contracts/lots';
import { useSubmit } from './use-submit';

export const useCreateLot = () => useSubmit((body: LotInput) => api('/lots', Lot, { method: 'POST', body }), ['/lots', '/enzymes']);
