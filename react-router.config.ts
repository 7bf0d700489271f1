import type { Config } from "@react-router/dev/config";

export default {
  appDirectory: "app",
  ssr: true,
  // scripts/test builds each run into a folder of its own, so two runs at once never rebuild under each other.
  buildDirectory: process.env.SKEWSMITH_BUILD_DIR || "build",
} satisfies Config;
