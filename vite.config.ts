import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vitest/config";

const underVitest = Boolean(process.env.VITEST);
/** The fault tests restart PostgreSQL, so `npm test` runs them on their own, after the rest. */
const faultRun = process.env.DIPWELL_FAULTS === "1";

export default defineConfig({
  plugins: underVitest ? [] : [tailwindcss(), reactRouter()],
  resolve: { tsconfigPaths: true },
  server: { host: "127.0.0.1" },
  test: {
    // Unit tests of the pure engines live beside their code; integration and
    // browser tests live under tests/. `npm test` (app/ops/test.ts) starts the
    // services first; each integration worker gets its own database.
    projects: [
      {
        extends: true,
        test: {
          name: "unit",
          include: ["app/**/*.test.ts", "tests/unit/**/*.test.ts"],
          environment: "node",
          testTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          setupFiles: ["tests/support/worker-setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
      {
        extends: true,
        test: {
          name: "browser",
          include: ["tests/browser/**/*.test.ts"],
          environment: "node",
          fileParallelism: false,
          testTimeout: 180_000,
          hookTimeout: 240_000,
        },
      },
      ...(faultRun
        ? [
            {
              extends: true as const,
              test: {
                name: "faults",
                include: ["tests/faults/**/*.test.ts"],
                environment: "node",
                setupFiles: ["tests/faults/setup.ts"],
                fileParallelism: false,
                testTimeout: 180_000,
                hookTimeout: 120_000,
              },
            },
          ]
        : []),
    ],
  },
});
