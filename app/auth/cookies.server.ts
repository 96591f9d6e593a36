/**
 * The app's signed cookies (the session, the sign-in in progress): httpOnly, SameSite=Lax,
 * whole-site, Secure when APP_URL is https, signed with every key in SESSION_SECRET (the first
 * signs, the others still verify, so keys can be rotated).
 */
import { createCookie } from "react-router";
import { getEnv } from "~/env.server";

export function signedCookie(name: string, maxAgeS: number) {
  const env = getEnv();
  return createCookie(name, {
    httpOnly: true,
    sameSite: "lax",
    path: "/",
    maxAge: maxAgeS,
    secure: env.APP_URL?.startsWith("https:") ?? false,
    secrets: env.SESSION_SECRET.split(",").map((s) => s.trim()).filter(Boolean),
  });
}
