import type { Config } from "@react-router/dev/config";
import { injectManifest } from "workbox-build";

export default {
  ssr: true,
  // Lazy route discovery fetches /__manifest, which cannot work offline.
  routeDiscovery: { mode: "initial" },
  // Forms posted from APP_URL's origin pass the framework's action check even when a TLS proxy
  // hands the request over as http://. scripts/serve.mjs sets the same from APP_URL at run time
  // (so one build serves any APP_URL); this covers a build served some other way.
  allowedActionOrigins: process.env.APP_URL ? [new URL(process.env.APP_URL).host] : undefined,
  async buildEnd({ reactRouterConfig }) {
    // The PWA plugin only compiles the worker; the precache list is injected here, after
    // React Router has written every asset (its manifest-<hash>.js included).
    const clientDir = `${reactRouterConfig.buildDirectory}/client`;
    const { count, size, warnings } = await injectManifest({
      swSrc: `${clientDir}/sw.js`,
      swDest: `${clientDir}/sw.js`,
      globDirectory: clientDir,
      globPatterns: ["**/*.{js,css,woff2,svg,ico,webmanifest}", "icons/icon-192.png", "icons/maskable-192.png"],
      globIgnores: ["sw.js", "**/*.map", ".vite/**"],
      maximumFileSizeToCacheInBytes: 4 * 1024 * 1024,
    });
    for (const warning of warnings) console.warn(`[sw] ${warning}`);
    console.log(`[sw] precache: ${count} files, ${(size / 1024).toFixed(0)} KiB`);
  },
} satisfies Config;
