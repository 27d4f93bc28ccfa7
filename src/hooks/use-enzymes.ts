import { enzymeKey, enzymesKey } from '../api/keys';
import type { EnzymeDetail, EnzymeList, EnzymeSort } from '../contracts/enzymes';
import { useResource } from './use-resource';

export type EnzymeTableQuery = { q?: string; sort?: EnzymeSort; dir?: 'asc' | 'desc'; page?: number; pageSize?: number };

export const useEnzymes = (q: EnzymeTableQuery = {}) => useResource<EnzymeList>(enzymesKey(q));
export const useEnzyme = (id: number | null) => useResource<EnzymeDetail>(id ? enzymeKey(id) : null);
