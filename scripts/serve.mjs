#!/usr/bin/env node
/**
 * Tilldawn's production server: the React Router build behind Express, with what the app
 * needs from the connection itself (issue 9):
 *
 * - The client's address for limits is the socket's peer; only with TRUST_PROXY=n (n proxies
 *   in front) is it read from X-Forwarded-For, n hops from the right. Routes get it as
 *   `context.clientAddress`; no header a client sends decides it.
 * - Host allowlist: APP_URL's host, plus loopback names on PORT for a local run. Anything else
 *   is 421 (a DNS-rebinding page cannot drive the app through another name).
 * - APP_URL's host is the framework's allowed action origin (forms work behind a TLS proxy).
 * - Headers on every answer: nosniff, Referrer-Policy, X-Frame-Options and a CSP with
 *   frame-ancestors 'none' (documents get a nonce-based one from app/entry.server.tsx), HSTS
 *   when APP_URL is https, and `Cache-Control: private, no-store` on every answer from the app
 *   that does not set its own (static assets keep theirs).
 *
 * Usage: node scripts/serve.mjs [build/server/index.js]   (PORT, HOST, APP_URL, TRUST_PROXY)
 */
import { randomBytes } from "node:crypto";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";
import morgan from "morgan";

const buildPath = path.resolve(process.argv[2] ?? "build/server/index.js");
const build = await import(pathToFileURL(buildPath).href);
const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST;
const trustProxy = Number(process.env.TRUST_PROXY ?? 0);
if (!Number.isInteger(trustProxy) || trustProxy < 0 || trustProxy > 10) {
  console.error("Tilldawn cannot start: TRUST_PROXY must be a whole number of proxies from 0 to 10.");
  process.exit(78);
}
const appUrl = process.env.APP_URL ? new URL(process.env.APP_URL) : null;
const https = appUrl?.protocol === "https:";
const loopbackNames = ["127.0.0.1", "localhost", "[::1]"];
const local = process.env.NODE_ENV !== "production" || !appUrl || loopbackNames.includes(appUrl.hostname);

/** Host header values this server answers to. */
export const allowedHosts = new Set([
  ...(appUrl ? [appUrl.host.toLowerCase()] : []),
  ...(local ? loopbackNames.flatMap((name) => [`${name}:${port}`, ...(port === 80 ? [name] : [])]) : []),
]);

const STATIC_HTML_CSP =
  "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data:; object-src 'none'; base-uri 'self'; form-action 'self'; frame-ancestors 'none'";
const OTHER_CSP = "default-src 'none'; frame-ancestors 'none'";

/** Adds the headers every answer carries, just before they are written (after the app set its own). */
function securityHeaders({ dynamic }) {
  return (req, res, next) => {
    const writeHead = res.writeHead;
    res.writeHead = function (...args) {
      if (!res.headersSent) {
        res.setHeader("X-Content-Type-Options", "nosniff");
        res.setHeader("Referrer-Policy", "same-origin");
        res.setHeader("X-Frame-Options", "DENY");
        res.setHeader("Cross-Origin-Opener-Policy", "same-origin");
        if (https) res.setHeader("Strict-Transport-Security", "max-age=31536000; includeSubDomains");
        if (!res.getHeader("Content-Security-Policy")) {
          const type = String(res.getHeader("Content-Type") ?? "");
          // A worker's script carries its own CSP into the worker: leave scripts alone.
          if (/html/i.test(type)) res.setHeader("Content-Security-Policy", STATIC_HTML_CSP);
          else if (!/javascript|css|font|image|manifest/i.test(type)) res.setHeader("Content-Security-Policy", OTHER_CSP);
        }
        if (dynamic && !res.getHeader("Cache-Control")) res.setHeader("Cache-Control", "private, no-store");
      }
      return writeHead.apply(this, args);
    };
    next();
  };
}

const app = express();
app.disable("x-powered-by");
app.set("trust proxy", trustProxy);

app.use((req, res, next) => {
  const wanted = String(req.headers.host ?? "").toLowerCase();
  if (allowedHosts.has(wanted)) return next();
  res.status(421).type("application/json").setHeader("Cache-Control", "no-store");
  res.send(JSON.stringify({ error: { code: "unknown_host", message: "This server does not answer to that host name. Set APP_URL to the address you open." } }));
});

app.use(compression());
const assets = path.join(path.dirname(buildPath), "..", "client");
app.use(securityHeaders({ dynamic: false }));
app.use("/assets", express.static(path.join(assets, "assets"), { immutable: true, maxAge: "1y" }));
app.use(express.static(assets, { maxAge: "1h", index: false }));
app.use(express.static("public", { maxAge: "1h", index: false }));
app.use(morgan("tiny"));
app.use(securityHeaders({ dynamic: true }));
app.all(
  "*",
  createRequestHandler({
    // Behind a TLS-terminating proxy the request reaches us as http://…, so the framework's own
    // action check would refuse https://APP_URL's forms: APP_URL's host is an allowed origin.
    build: { ...build, allowedActionOrigins: appUrl ? [appUrl.host] : [] },
    mode: process.env.NODE_ENV,
    getLoadContext: (req) => ({ clientAddress: req.ip ?? req.socket.remoteAddress ?? "unknown", cspNonce: randomBytes(16).toString("base64") }),
  }),
);

const server = host ? app.listen(port, host, onListen) : app.listen(port, onListen);
function onListen() {
  console.log(`[tilldawn] serving on http://${host ?? "0.0.0.0"}:${port} (hosts: ${[...allowedHosts].join(", ") || "none"})`);
}
for (const signal of ["SIGTERM", "SIGINT"]) process.once(signal, () => server.close(() => process.exit(0)));
