import { useEffect, useRef, useState } from "react";
import { useLocation } from "react-router";

import type { Workbox as Wb } from "workbox-window";

/** The pages worth keeping for offline use when a path is opened (a rig's Now and Logbook). */
export function pagesToKeep(pathname: string, origin: string): string[] {
  const urls = new Set([`${origin}${pathname}`]);
  const rig = /^\/rigs\/([0-9a-f-]{36})(?:\/|$)/i.exec(pathname);
  if (rig) for (const p of [`/rigs/${rig[1]}`, `/rigs/${rig[1]}/log`]) urls.add(`${origin}${p}`);
  return [...urls];
}

/**
 * Registers the service worker in production builds, offers a reload when a new version is
 * waiting, and asks the worker to keep each page opened (the first visit is not controlled
 * by the worker, and pages reached by in-app navigation are never fetched as documents).
 * No worker runs in development.
 */
export function ServiceWorkerUpdate() {
  const [apply, setApply] = useState<(() => void) | null>(null);
  const wbRef = useRef<Wb | null>(null);
  const location = useLocation();

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
        wbRef.current = wb;
        wb.messageSW({ type: "CACHE_URLS", payload: { urlsToCache: pagesToKeep(window.location.pathname, window.location.origin) } }).catch(() => {});
      });
    });
    return () => {
      cancelled = true;
    };
  }, []);

  useEffect(() => {
    const wb = wbRef.current;
    if (!wb || !navigator.onLine) return;
    wb.messageSW({ type: "CACHE_URLS", payload: { urlsToCache: pagesToKeep(location.pathname, window.location.origin) } }).catch(() => {});
  }, [location.pathname]);

  if (!apply) return null;
  return (
    <div role="status" className="fixed inset-x-3 bottom-20 z-50 flex items-center justify-between gap-3 rounded-2xl border border-dawn-500 bg-night-800 p-3 md:bottom-4 md:left-auto md:w-96">
      <span>A new version of Tilldawn is ready.</span>
      <div className="flex gap-2">
        <button type="button" onClick={() => setApply(null)} className="min-h-12 rounded-xl px-3 font-bold text-night-300">
          Later
        </button>
        <button type="button" onClick={apply} className="min-h-12 rounded-xl bg-dawn-500 px-4 font-bold text-night-950">
          Reload
        </button>
      </div>
    </div>
  );
}
