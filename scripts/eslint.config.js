// ESLint flat config (run through `npm run lint`, which points ESLint here).
import tseslint from "typescript-eslint";
import reactHooks from "eslint-plugin-react-hooks";

export default tseslint.config(
  { ignores: ["build/**", ".react-router/**", "node_modules/**", ".data/**", "drizzle/**", "public/**"] },
  ...tseslint.configs.recommended,
  {
    files: ["**/*.{ts,tsx}"],
    plugins: { "react-hooks": reactHooks },
    rules: {
      "react-hooks/rules-of-hooks": "error",
      "react-hooks/exhaustive-deps": "warn",
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      "@typescript-eslint/consistent-type-imports": ["error", { fixStyle: "inline-type-imports" }],
    },
  },
  {
    // The power engine runs unchanged on the server and on the phone: plain TypeScript only.
    files: ["app/engine/**/*.ts"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            { regex: "^(react|react-dom|react-router|@react-router/.*|drizzle-orm.*|dexie|pg)(/.*)?$", message: "The engine stays free of framework, database and storage imports." },
            { regex: "^node:", message: "The engine runs in the browser too: no Node built-ins." },
            { regex: "^~/(?!engine/)", message: "The engine imports only from app/engine." },
            { regex: "\\.server$", message: "The engine cannot import server-only modules." },
          ],
        },
      ],
    },
  },
  {
    // Browser-side modules never import server-only code.
    files: ["app/**/*.client.{ts,tsx}", "sw/**/*.ts"],
    rules: {
      "no-restricted-imports": ["error", { patterns: [{ regex: "\\.server(\\.tsx?)?$", message: "Server-only module." }] }],
    },
  },
);
