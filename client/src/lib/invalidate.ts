import { useQueryClient, type QueryKey } from '@tanstack/react-query';

/** Marks the queries under each key stale, and those on screen refetch: a write names every key it changed. */
export function useInvalidate() {
  const client = useQueryClient();
  return (...keys: QueryKey[]) => Promise.all(keys.map((queryKey) => client.invalidateQueries({ queryKey })));
}
