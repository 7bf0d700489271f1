import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vite";

export default defineConfig(({ isSsrBuild }) => ({
  plugins: [tailwindcss(), reactRouter()],
  server: { host: "127.0.0.1" },
  // The server build's entry is the Node server around the app (server/app.ts, started by server.js).
  build: isSsrBuild ? { rollupOptions: { input: "./server/app.ts" } } : undefined,
  // The core package ships TypeScript source; bundle it into the server build instead of importing it at run time.
  ssr: { noExternal: ["@skewsmith/core"] },
  // The bench's worker imports modules of its own (core, the engine), so it is built as an ES module.
  worker: { format: "es" },
}));
