import { useEffect, useState, useSyncExternalStore } from "react";
import { useLocation } from "react-router";
import { cn } from "~/lib/cn";
import { useSyncStatus } from "~/offline/live.client";
import { syncRunner, type SyncStatus } from "~/offline/sync.client";

/** The words for each sync state (ours; short enough for a phone's header). */
export function syncLabel(s: SyncStatus): { text: string; tone: "ok" | "wait" | "bad" } {
  const waiting = s.waiting === 1 ? "1 change waiting" : `${s.waiting} changes waiting`;
  if (s.state === "syncing") return { text: s.waiting ? `Syncing · ${waiting}` : "Syncing", tone: "wait" };
  if (s.state === "offline") return { text: s.waiting ? `Offline · saved on phone (${waiting})` : "Offline", tone: "wait" };
  if (s.state === "error") {
    if (s.error?.code === "auth") return { text: `Sign in again to sync${s.waiting ? ` · ${waiting}` : ""}`, tone: "bad" };
    return { text: `Couldn't sync${s.waiting ? ` · ${waiting}` : ""}`, tone: "bad" };
  }
  if (s.waiting) return { text: `Saved on phone · ${waiting}`, tone: "wait" };
  return { text: s.lastSyncedAt ? "Synced" : "Saved on phone", tone: "ok" };
}

/** Whether the browser has a network at all (the runner may not have tried yet). */
function useOnline(): boolean {
  return useSyncExternalStore(
    (notify) => {
      window.addEventListener("online", notify);
      window.addEventListener("offline", notify);
      return () => (window.removeEventListener("online", notify), window.removeEventListener("offline", notify));
    },
    () => navigator.onLine,
    () => true,
  );
}

/** A visible sync state with the count of waiting changes, a retry, and a sign-in prompt. */
export function SyncStatusBar({ className }: { className?: string }) {
  const runner = useSyncStatus();
  const online = useOnline();
  // With no network the badge says so, whatever the runner last saw.
  const status: SyncStatus = !online && runner.state !== "offline" ? { ...runner, state: "offline" } : runner;
  const location = useLocation();
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  if (!hydrated) return null;
  const { text, tone } = syncLabel(status);
  const signIn = `/sign-in?${new URLSearchParams({ redirectTo: location.pathname + location.search })}`;
  return (
    <div className={cn("flex flex-wrap items-center gap-2", className)}>
      <p
        role="status"
        aria-live="polite"
        data-sync-state={status.state}
        data-tone={tone}
        data-waiting={status.waiting}
        className={cn(
          "inline-flex min-h-10 items-center gap-2 rounded-full border px-3 text-sm font-bold tabular",
          tone === "ok" && "border-leaf-400 text-leaf-400",
          tone === "wait" && "border-dawn-500 text-dawn-300",
          tone === "bad" && "border-ember-500 text-ember-300",
        )}
      >
        <span aria-hidden="true">{tone === "ok" ? "✓" : tone === "wait" ? "◷" : "!"}</span>
        {text}
      </p>
      {status.state === "error" && status.error?.code === "auth" ? (
        <a href={signIn} className="inline-flex min-h-10 items-center rounded-full bg-dawn-500 px-3 text-sm font-bold text-night-950">
          Sign in
        </a>
      ) : status.state === "error" ? (
        <button
          type="button"
          onClick={() => void syncRunner().syncNow("manual")}
          className="inline-flex min-h-10 items-center rounded-full border border-night-600 px-3 text-sm font-bold hover:border-dawn-500"
        >
          Retry
        </button>
      ) : null}
      {status.state === "error" && status.error ? <p className="w-full text-sm text-night-300">{status.error.message}</p> : null}
      {status.refused ? (
        <p className="w-full text-sm text-ember-300">
          {status.refused === 1 ? "1 change was" : `${status.refused} changes were`} not accepted by the server — see the logbook.
        </p>
      ) : null}
    </div>
  );
}
