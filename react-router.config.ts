import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  // Test runs in parallel slots build into folders of their own (app/ops/test.ts).
  buildDirectory: process.env.DIPWELL_BUILD_DIR ?? "build",
  future: {
    v8_middleware: true,
    v8_passThroughRequests: true,
    v8_splitRouteModules: true,
    v8_trailingSlashAwareDataRequests: true,
    v8_viteEnvironmentApi: true,
  },
} satisfies Config;
