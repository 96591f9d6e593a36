/** The rig this browser last opened, so "/" can go straight back to it. */
export const LAST_RIG_COOKIE = "tilldawn_last_rig";

export function lastRigFromCookieHeader(header: string | null): string | null {
  const part = header?.split(/;\s*/).find((p) => p.startsWith(`${LAST_RIG_COOKIE}=`));
  return part ? decodeURIComponent(part.slice(LAST_RIG_COOKIE.length + 1)) || null : null;
}

export function lastRigSetCookie(rigId: string): string {
  return `${LAST_RIG_COOKIE}=${encodeURIComponent(rigId)}; Path=/; Max-Age=31536000; SameSite=Lax; HttpOnly`;
}
