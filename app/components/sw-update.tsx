import { useEffect, useState } from "react";

/**
 * Registers the service worker in production builds and offers a reload when a new version is
 * waiting. No worker runs in development.
 */
export function ServiceWorkerUpdate() {
  const [apply, setApply] = useState<(() => void) | null>(null);

  useEffect(() => {
    if (!import.meta.env.PROD || !("serviceWorker" in navigator)) return;
    let cancelled = false;
    void import("workbox-window").then(({ Workbox }) => {
      if (cancelled) return;
      const wb = new Workbox("/sw.js", { scope: "/" });
      wb.addEventListener("waiting", () => {
        setApply(() => () => {
          wb.addEventListener("controlling", () => window.location.reload());
          wb.messageSkipWaiting();
        });
      });
      void wb.register().then(() => {
        // The first visit is not controlled yet: ask the worker to keep this page for offline use.
        wb.messageSW({ type: "CACHE_URLS", payload: { urlsToCache: [window.location.href] } }).catch(() => {});
      });
    });
    return () => {
      cancelled = true;
    };
  }, []);

  if (!apply) return null;
  return (
    <div role="status" className="fixed inset-x-3 bottom-20 z-50 flex items-center justify-between gap-3 rounded-2xl border border-dawn-500 bg-night-800 p-3 md:bottom-4 md:left-auto md:w-96">
      <span>A new version of Tilldawn is ready.</span>
      <button type="button" onClick={apply} className="min-h-12 rounded-xl bg-dawn-500 px-4 font-bold text-night-950">
        Reload
      </button>
    </div>
  );
}
