import { data, isRouteErrorResponse } from "react-router";

/**
 * Offline first for a route's clientLoader: with a connection, the server's data (kept on the
 * phone by `keep`); without one, or when the server cannot be reached, the phone's copy.
 * Sign-in redirects, 403 and 404 from the server stand: only a missing network falls back.
 */
export async function serverThenPhone<Server, Phone>(
  serverLoader: () => Promise<Server>,
  fromPhone: () => Promise<Phone | null>,
  keep?: (fresh: Server) => Promise<void>,
): Promise<Server | Phone> {
  try {
    if (!navigator.onLine) throw new Error("offline");
    const fresh = await serverLoader();
    if (keep) void keep(fresh);
    return fresh;
  } catch (error) {
    if (error instanceof Response || (isRouteErrorResponse(error) && error.status < 500)) throw error;
    const local = await fromPhone();
    if (local) return local;
    throw error;
  }
}

/**
 * The rig's read views (as built, day budget) offline: the server's data when it answers, else
 * what the phone kept for the Now screen, in a shape both views read (rig, model, revision,
 * shared state, time).
 */
export async function rigReadViewLoader<Server>(rigId: string, serverLoader: () => Promise<Server>) {
  const { readNowLocal } = await import("./now.client");
  return serverThenPhone(serverLoader, async () => {
    const p = await readNowLocal(rigId);
    if (!p) return null;
    return {
      rig: { id: p.model.rigId, name: p.model.name },
      model: p.model.model,
      revision: p.model.revision,
      state: p.shared.state,
      nowMs: Math.floor(p.nowMs / 60_000) * 60_000,
    };
  });
}

/** What a page kept on the phone for offline use, and when. */
export type OfflineCopy = { savedAt: number } | null;

/**
 * A page whose data comes from the server (Rigs, People, Account) opened offline: the copy this
 * phone kept the last time it was shown online, marked with `offlineCopy`; with no copy, a plain
 * "needs a connection" answer instead of an error.
 */
export async function serverOrPhoneCopy<Server extends object>(key: string, serverLoader: () => Promise<Server>): Promise<Server & { offlineCopy: OfflineCopy }> {
  const { getMeta, localDb } = await import("./db.client");
  try {
    const answer = await serverThenPhone(
      async () => ({ ...(await serverLoader()), offlineCopy: null as OfflineCopy }),
      async () => {
        const kept = await getMeta<{ savedAt: number; data: Server } | null>(localDb(), `page:${key}`, null);
        return kept ? { ...kept.data, offlineCopy: { savedAt: kept.savedAt } } : null;
      },
      (fresh) => keepPageCopy(key, fresh),
    );
    return answer;
  } catch (error) {
    if (error instanceof Response || isRouteErrorResponse(error)) throw error;
    throw data({ message: "This page needs a connection the first time: open it once online and this phone keeps a copy for offline use." }, { status: 503, statusText: "Needs a connection" });
  }
}

/** Keeps a page's server data on the phone (also called after a server-rendered first load). */
export async function keepPageCopy(key: string, value: object): Promise<void> {
  const { localDb, setMeta } = await import("./db.client");
  const { offlineCopy: _drop, ...rest } = value as { offlineCopy?: unknown };
  await setMeta(localDb(), `page:${key}`, { savedAt: Date.now(), data: rest });
}
