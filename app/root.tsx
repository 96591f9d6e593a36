import {
  data,
  isRouteErrorResponse,
  type ShouldRevalidateFunctionArgs,
  Links,
  Meta,
  Outlet,
  Scripts,
  ScrollRestoration,
  useRouteLoaderData,
} from "react-router";
import type { Route } from "./+types/root";
import { AppShell } from "~/components/app-shell";
import { ServiceWorkerUpdate } from "~/components/sw-update";
import { SyncAgent } from "~/components/sync-agent";
import { QueryProvider } from "~/hooks/query-provider";
import { nightCookieValue } from "~/lib/night-mode";
import { getUserAndRefresh } from "~/auth/session.server";
import { currentRigOf } from "~/auth/guards.server";
import { navFor } from "~/components/app-shell";
import { lastRigSetCookie } from "~/lib/last-rig";
import { thrownMessage } from "~/lib/http";
import "./app.css";
import { useNonce } from "~/lib/nonce";
// The two weights the first screen uses, preloaded so text does not wait on the CSS to name them
// (@fontsource's CSS declares font-display: swap, so text shows at once in a fallback face).
import font400 from "@fontsource/atkinson-hyperlegible/files/atkinson-hyperlegible-latin-400-normal.woff2?url";
import font700 from "@fontsource/atkinson-hyperlegible/files/atkinson-hyperlegible-latin-700-normal.woff2?url";

export const links: Route.LinksFunction = () => [
  { rel: "preload", href: font400, as: "font", type: "font/woff2", crossOrigin: "anonymous" },
  { rel: "preload", href: font700, as: "font", type: "font/woff2", crossOrigin: "anonymous" },
  { rel: "manifest", href: "/manifest.webmanifest" },
  { rel: "icon", href: "/favicon.ico", sizes: "32x32" },
  { rel: "icon", href: "/icons/icon.svg", type: "image/svg+xml" },
  { rel: "apple-touch-icon", href: "/icons/icon-180.png" },
];

export async function loader({ request, params }: Route.LoaderArgs) {
  // Every page learns who is signed in; a session in use has its expiry rolled forward here.
  const { user, setCookie } = await getUserAndRefresh(request);
  const chosen = nightCookieValue(request.headers.get("cookie"));
  const headers = new Headers();
  if (setCookie) headers.append("Set-Cookie", setCookie);
  // On a rig's pages: that rig goes in the navigation and is remembered for "/".
  const currentRig = user ? await currentRigOf(user.id, params.rigId) : null;
  if (currentRig) headers.append("Set-Cookie", lastRigSetCookie(currentRig.id));
  return data(
    {
      night: chosen ?? user?.preferences.nightDefault ?? false,
      user: user ? { name: user.name, email: user.email } : null,
      // Units and clock for every page (kept in the page's data, so they hold offline too).
      display: user ? { ...pick(user.preferences) } : null,
      currentRig,
    },
    { headers },
  );
}

const pick = ({ lengthUnit, cableUnit, temperatureUnit, clock }: { lengthUnit: "metric" | "imperial"; cableUnit: "awg" | "mm2"; temperatureUnit: "c" | "f"; clock: "24h" | "12h" }) => ({ lengthUnit, cableUnit, temperatureUnit, clock });

/**
 * Offline, the root's server data (who is signed in, night mode) is kept as it was: asking
 * again would fail and replace the page with an error. The logbook's local-first writes never
 * need it again either.
 */
export function shouldRevalidate({ formAction, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  if (typeof navigator !== "undefined" && !navigator.onLine) return false;
  if (formAction && /^\/rigs\/[^/]+\/log(\/|\?|$)/.test(formAction)) return false;
  return defaultShouldRevalidate;
}

export function Layout({ children }: { children: React.ReactNode }) {
  const root = useRouteLoaderData<typeof loader>("root");
  const night = root?.night ?? false;
  const nonce = useNonce();
  return (
    <html lang="en" className={night ? "night" : undefined}>
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1, viewport-fit=cover" />
        <meta name="theme-color" content={night ? "#000000" : "#0a1030"} />
        <meta name="description" content="Will the battery bank last till dawn? Runway, budget and wiring for life off your own bank." />
        <Meta />
        <Links />
      </head>
      <body>
        {children}
        <ScrollRestoration nonce={nonce} />
        <Scripts nonce={nonce} />
      </body>
    </html>
  );
}

export default function App({ loaderData }: Route.ComponentProps) {
  return (
    <AppShell night={loaderData.night} nav={navFor(loaderData.user !== null, loaderData.currentRig?.id)}>
      <QueryProvider>
        <Outlet />
      </QueryProvider>
      <ServiceWorkerUpdate />
      <SyncAgent />
    </AppShell>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let title = "Something went wrong";
  let detail = "Tilldawn hit an unexpected problem. Your saved data is safe. Try again, or go back to the start.";
  if (isRouteErrorResponse(error)) {
    if (error.status === 404) {
      title = "Page not found";
      detail = "There is nothing at this address. It may have moved, or the rig may not be shared with you.";
    } else if (error.status === 403) {
      title = "Not open to you";
      detail = typeof error.data === "string" ? error.data : (error.data?.message ?? "Your role on this rig does not include this page.");
    } else if (error.status === 503) {
      title = "Needs a connection";
      detail = typeof error.data === "string" ? error.data : (error.data?.message ?? detail);
    } else {
      title = `${error.status} ${error.statusText || "Error"}`;
      detail = thrownMessage(error.data) ?? detail;
    }
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
  }
  return (
    <main id="main" className="mx-auto flex min-h-dvh max-w-xl flex-col justify-center gap-4 p-6">
      <title>{`${title} · Tilldawn`}</title>
      <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Tilldawn</p>
      <h1 className="text-3xl font-bold">{title}</h1>
      <p className="text-lg text-night-200">{detail}</p>
      <p>
        <a href="/" className="inline-flex min-h-12 items-center rounded-xl bg-dawn-500 px-5 font-bold text-night-950">
          Back to the start
        </a>
      </p>
    </main>
  );
}
