import { createContext, useContext } from "react";

/**
 * The nonce of this document's Content-Security-Policy (made per request by scripts/serve.mjs,
 * set by app/entry.server.tsx). On the server it goes on every script React Router emits; in
 * the browser it is "" (the browser hides it, and scripts added after load need none).
 */
export const NonceContext = createContext("");
export const useNonce = () => useContext(NonceContext);

/** The document policy: scripts only from here or with the nonce; no eval; never framed. */
export function documentCsp(nonce: string, https: boolean): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "worker-src 'self'",
    "manifest-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}
