import { useLocalSearchParams } from 'expo-router';

/** The route's `name` parameter (`[id].tsx`, `?planId=`) as a record id: a positive whole number, or null when the address names none. */
export function useIdParam(name = 'id'): number | null {
  const n = Number(useLocalSearchParams()[name]);
  return Number.isInteger(n) && n > 0 ? n : null;
}
