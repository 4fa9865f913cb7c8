import { useSuspenseQuery } from '@tanstack/react-query';
import { authQueries, type Me } from './api';

/** The signed-in user inside the authenticated shell (the shell has already made sure there is one). */
export function useMe(): Me {
  const { data } = useSuspenseQuery(authQueries.me());
  if (!data) throw new Error('useMe used outside the signed-in shell');
  return data;
}
