import { useEffect } from "react";

/**
 * Starts the sync runner once in the browser (mounted by the root). The offline store and the
 * runner load after the page is up, so a page's first load does not wait for them.
 */
export function SyncAgent() {
  useEffect(() => {
    let stopped = false;
    let stop: (() => void) | undefined;
    void import("~/offline/sync.client").then(({ syncRunner }) => {
      if (stopped) return;
      const runner = syncRunner();
      runner.start();
      stop = () => runner.stop();
    });
    return () => {
      stopped = true;
      stop?.();
    };
  }, []);
  return null;
}
