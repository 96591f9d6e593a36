import { isRouteErrorResponse } from "react-router";

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
