import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { VitePWA } from "vite-plugin-pwa";
import { defineConfig, type PluginOption } from "vite";

// The PWA plugin compiles sw/sw.ts for the client build only; the precache list is injected
// in react-router.config.ts's buildEnd hook, once every asset exists.
const pwa = (VitePWA({
  strategies: "injectManifest",
  srcDir: "sw",
  filename: "sw.ts",
  injectRegister: false,
  manifest: false,
  injectManifest: { injectionPoint: undefined },
  devOptions: { enabled: false },
}) as PluginOption[]).flat().map((plugin) =>
  plugin && typeof plugin === "object" && "name" in plugin
    ? { ...plugin, applyToEnvironment: (env: { name: string }) => env.name === "client" }
    : plugin,
);

export default defineConfig({
  plugins: [tailwindcss(), reactRouter(), ...pwa],
  resolve: { tsconfigPaths: true },
  server: { host: "127.0.0.1" },
});
