/** Query hooks that read the local store first and re-render when it changes (Dexie liveQuery). */
import { liveQuery } from "dexie";
import { useEffect, useState, useSyncExternalStore } from "react";
import { syncRunner, type SyncStatus } from "./sync.client";

export type Live<T> = { data: T; loading: boolean; error: Error | null };

export function useLive<T>(query: () => Promise<T>, deps: unknown[], initial: T): Live<T> {
  const [state, setState] = useState<Live<T>>({ data: initial, loading: true, error: null });
  useEffect(() => {
    const sub = liveQuery(query).subscribe({
      next: (data) => setState({ data, loading: false, error: null }),
      error: (error: unknown) => setState((s) => ({ ...s, loading: false, error: error instanceof Error ? error : new Error(String(error)) })),
    });
    return () => sub.unsubscribe();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, deps);
  return state;
}

const serverStatus: SyncStatus = { state: "idle", waiting: 0, refused: 0, lastSyncedAt: null, error: null, retryAt: null, notices: [] };

/** The sync runner's status (idle, syncing, offline, error) and the count of waiting changes. */
export function useSyncStatus(): SyncStatus {
  return useSyncExternalStore(
    (notify) => syncRunner().subscribe(() => notify()),
    () => syncRunner().getStatus(),
    () => serverStatus,
  );
}
