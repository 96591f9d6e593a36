/** The sync runner's status as a React hook (live queries of the local store: dexie-react-hooks' useLiveQuery). */
import { useSyncExternalStore } from "react";
import { syncRunner, type SyncStatus } from "./sync.client";

const serverStatus: SyncStatus = { state: "idle", waiting: 0, refused: 0, lastSyncedAt: null, error: null, retryAt: null, notices: [] };

/** The sync runner's status (idle, syncing, offline, error) and the count of waiting changes. */
export function useSyncStatus(): SyncStatus {
  return useSyncExternalStore(
    (notify) => syncRunner().subscribe(() => notify()),
    () => syncRunner().getStatus(),
    () => serverStatus,
  );
}
