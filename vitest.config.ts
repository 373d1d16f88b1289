// Vitest runs without the React Router plugin so that server-only modules import plainly.
import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

const alias = { "~": fileURLToPath(new URL("./app", import.meta.url)) };

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: "unit",
          include: ["app/**/*.test.ts", "simulator/**/*.test.ts", "tests/docs/**/*.test.ts"],
        },
      },
      {
        resolve: { alias },
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          globalSetup: ["tests/integration/global-setup.ts"],
          setupFiles: ["tests/integration/setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
      {
        // Cluster mode against a real RabbitMQ node: `npm run test:cluster` (RabbitMQ is not needed by `npm test`).
        resolve: { alias },
        test: {
          name: "cluster",
          include: ["tests/cluster/**/*.test.ts"],
          globalSetup: ["tests/integration/global-setup.ts"],
          setupFiles: ["tests/integration/setup.ts"],
          testTimeout: 120_000,
          hookTimeout: 300_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
