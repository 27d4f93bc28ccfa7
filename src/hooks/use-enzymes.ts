import { enzymeKey, enzymesKey } from '../api/keys';
import { EnzymeDetail, EnzymeList, type EnzymeSort } from '../contracts/enzymes';
import { useResource } from './use-resource';

export type EnzymeTableQuery = { q?: string; sort?: EnzymeSort; dir?: 'asc' | 'desc'; page?: number; pageSize?: number };

export const useEnzymes = (q: EnzymeTableQuery = {}) => useResource(enzymesKey(q), EnzymeList);
export const useEnzyme = (id: number | null) => useResource(id ? enzymeKey(id) : null, EnzymeDetail);
