/** Night mode (red-only) is remembered in a cookie so the server renders it without a flash. */
export const NIGHT_COOKIE = "tilldawn_night";

export function nightFromCookieHeader(header: string | null): boolean {
  if (!header) return false;
  return header.split(/;\s*/).some((part) => part === `${NIGHT_COOKIE}=1`);
}

/** The night-mode choice stored in this browser, or null when none was made here yet. */
export function nightCookieValue(header: string | null): boolean | null {
  const part = header?.split(/;\s*/).find((p) => p.startsWith(`${NIGHT_COOKIE}=`));
  return part === undefined ? null : part === `${NIGHT_COOKIE}=1`;
}

export function setNightMode(on: boolean) {
  document.documentElement.classList.toggle("night", on);
  document.cookie = `${NIGHT_COOKIE}=${on ? 1 : 0}; Path=/; Max-Age=31536000; SameSite=Lax`;
  document
    .querySelector('meta[name="theme-color"]')
    ?.setAttribute("content", on ? "#000000" : "#0a1030");
}
