import { api } from '../api/client';
import { Enzyme, type EnzymeInput } from '../contracts/enzymes';
import { useSubmit } from './use-submit';

/** Creates an enzyme, or edits one when `id` is given. */
export const useSaveEnzyme = () =>
  useSubmit((body: EnzymeInput, id?: number) => api(id ? `/enzymes/${id}` : '/enzymes', Enzyme, { method: id ? 'PATCH' : 'POST', body }), ['/enzymes', '/lots']);
