import { fileURLToPath } from "node:url";
import { reactRouter } from "@react-router/dev/vite";
import { defineConfig } from "vite";

export default defineConfig({
  root: fileURLToPath(new URL(".", import.meta.url)),
  plugins: [reactRouter()],
  resolve: { alias: { "~": fileURLToPath(new URL("../../app", import.meta.url)) } },
  logLevel: "warn",
});
