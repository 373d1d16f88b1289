// ESLint (flat config): typescript-eslint's recommended rules, React's hooks rules on the app's code,
// and eslint-config-prettier last so that no rule argues with the formatter (Prettier owns layout).
import js from "@eslint/js";
import { defineConfig, globalIgnores } from "eslint/config";
import prettier from "eslint-config-prettier/flat";
import reactHooks from "eslint-plugin-react-hooks";
import tseslint from "typescript-eslint";

export default defineConfig(
  // Built, generated or local files: the builds, typegen's +types, drizzle-kit's snapshots, data.
  globalIgnores([
    "build/",
    ".react-router/",
    "**/+types/",
    "drizzle/meta/",
    ".data/",
    ".bench/",
    "test-results/",
    "playwright-report/",
  ]),
  js.configs.recommended,
  tseslint.configs.recommended,
  {
    rules: {
      // Input is screened for control characters on purpose (ids, refused payloads shown to the
      // admin, mail headers), so a control character in a pattern is meant, not a typo.
      "no-control-regex": "off",
      // A leading underscore marks a parameter or binding kept for its position (`(_, i) =>`).
      "@typescript-eslint/no-unused-vars": [
        "error",
        { argsIgnorePattern: "^_", varsIgnorePattern: "^_", caughtErrorsIgnorePattern: "^_" },
      ],
    },
  },
  // Only the app has React components and hooks; elsewhere `use…` names are Playwright fixtures
  // and test helpers (`use`, `useMailSink`), which the hooks rules would misread.
  { files: ["app/**/*.{ts,tsx}"], extends: [reactHooks.configs.flat.recommended] },
  prettier,
  // After eslint-config-prettier, which switches max-len off: Prettier wraps code at 120 but cannot
  // break strings, template literals or comments, so this keeps those from growing past 160.
  // URLs and regular expressions may run long; splitting them would only hurt reading.
  {
    rules: {
      "max-len": ["error", { code: 160, ignoreUrls: true, ignoreRegExpLiterals: true }],
    },
  },
);
