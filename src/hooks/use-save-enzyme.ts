import { api } from '../api/client';
import type { Enzyme, EnzymeInput } from '../contracts/enzymes';
import { useSubmit } from './use-submit';

/** Creates an enzyme, or edits one when `id` is given. */
export const useSaveEnzyme = () =>
  useSubmit(
    (body: EnzymeInput, id?: number) => api<Enzyme>(id ? `/enzymes/${id}` : '/enzymes', { method: id ? 'PATCH' : 'POST', body }),
    ['/enzymes', '/lots'],
  );
