import { useEffect } from "react";
import { formatDateTime, phoneTimeZone } from "~/lib/datetime";
import { useDisplay } from "~/hooks/use-display";

type Copy = { savedAt: number } | null | undefined;

/**
 * Keeps the page's server data on the phone for offline use, and says so when what is shown is
 * that copy (and that changes need a connection).
 */
export function OfflineCopy({ pageKey, data, copy, what }: { pageKey: string; data: object; copy: Copy; what: string }) {
  const { time } = useDisplay(phoneTimeZone());
  useEffect(() => {
    if (copy) return;
    void import("~/offline/offline-loader.client").then(({ keepPageCopy }) => keepPageCopy(pageKey, data)).catch(() => undefined);
  }, [pageKey, data, copy]);
  if (!copy) return null;
  return (
    <p role="status" data-offline-copy className="rounded-2xl border border-dashed border-dawn-500 bg-night-900 p-3 text-night-200">
      <strong>Offline.</strong> This is the copy this phone kept on {formatDateTime(copy.savedAt, time)}. {what} need a connection.
    </p>
  );
}
