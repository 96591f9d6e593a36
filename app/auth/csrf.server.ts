/**
 * Cross-site request forgery: a state-changing request must come from our own pages. Browsers
 * send `Origin` on every POST and `Sec-Fetch-Site` on every request; we accept same-origin
 * (or "none": typed by the person) and refuse everything else, including requests with neither
 * header, with 403.
 */
import { data } from "react-router";
import { appOrigin } from "~/env.server";
import { apiError } from "~/lib/http";
import { isApiRequest } from "./session.server";

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/** The reason a request fails the check, or null when it passes. Pure: easy to test. */
export function crossSiteReason(request: Request, allowedOrigins: string[]): string | null {
  if (SAFE_METHODS.has(request.method.toUpperCase())) return null;
  const origin = request.headers.get("origin");
  const site = request.headers.get("sec-fetch-site");
  if (origin !== null && origin !== "null" && allowedOrigins.includes(origin)) {
    return site === null || site === "same-origin" || site === "none" ? null : `Sec-Fetch-Site is ${site}`;
  }
  if (origin !== null) return `Origin ${origin} is not this app`;
  if (site === "same-origin" || site === "none") return null;
  return site ? `Sec-Fetch-Site is ${site}` : "the request names no origin";
}

/**
 * The origins our own pages are served from: APP_URL's (the request's own only while APP_URL
 * is unset, on a local run whose Host the server has already checked against loopback). The
 * request's URL is not proof of anything: behind a proxy, or with a forged Host, it can say
 * whatever the client wants.
 */
export function allowedOrigins(request: Request): string[] {
  return [appOrigin(request)];
}

/** Throws 403 for a state-changing request from another site. */
export function requireSameOrigin(request: Request): void {
  const reason = crossSiteReason(request, allowedOrigins(request));
  if (!reason) return;
  const message = "This request did not come from Tilldawn's own pages, so it was refused.";
  if (isApiRequest(request)) throw apiError(403, "cross_site_request", message);
  throw data({ message }, { status: 403 });
}

/**
 * Wraps a route action so the same-origin check runs before anything else. Every action that
 * changes state is written as `export const action = protectedAction(async (args) => …)`;
 * the permission matrix test sends a cross-site POST to each one and expects 403.
 */
export function protectedAction<A extends { request: Request }, R>(handler: (args: A) => Promise<R>) {
  return async (args: A): Promise<R> => {
    requireSameOrigin(args.request);
    return handler(args);
  };
}
