import { queryOptions, useQuery } from '@tanstack/react-query';
import { useSyncExternalStore } from 'react';
import type { OvertakenEntry } from '../../../shared/schemas/inspection';
import { apiGet } from '../../lib/api-client';

/**
 * The signed-in fitter's entries overtaken by another fitter's later-recorded entry, in either
 * arrival order (decision 42). Asked every 15 s, so the first-arriving tablet learns of it.
 */
export const overtakenQuery = (projectId: string) =>
  queryOptions({
    queryKey: ['projects', projectId, 'rounds', 'overtaken'],
    queryFn: () => apiGet<OvertakenEntry[]>(`/api/projects/${projectId}/rounds/overtaken`),
    refetchInterval: 15_000,
  });

/** Dismissed notices are kept on the device (by audit event id), so a reload does not bring them back. */
const KEY = 'kerfwise.overtaken.dismissed';
const listeners = new Set<() => void>();
let dismissedText = localStorage.getItem(KEY) ?? '[]';

function readDismissed(): ReadonlySet<number> {
  try {
    return new Set(JSON.parse(dismissedText) as number[]);
  } catch {
    return new Set();
  }
}

export function dismissOvertakenNotices(ids: number[]) {
  dismissedText = JSON.stringify([...new Set([...readDismissed(), ...ids])]);
  localStorage.setItem(KEY, dismissedText);
  listeners.forEach((l) => l());
}

const subscribe = (l: () => void) => {
  listeners.add(l);
  return () => listeners.delete(l);
};

/** All of the caller's overtaken entries for the project, and those not yet dismissed in the top bar. */
export function useOvertaken(projectId: string | undefined) {
  const { data = [] } = useQuery({ ...overtakenQuery(projectId ?? ''), enabled: !!projectId });
  useSyncExternalStore(subscribe, () => dismissedText);
  const dismissed = readDismissed();
  return { all: data, undismissed: data.filter((o) => !dismissed.has(o.id)) };
}
