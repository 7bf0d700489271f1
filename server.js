// Starts Skewsmith's web server: the production build (NODE_ENV=production, the default), or the development
// server with Vite's hot reload (NODE_ENV=development). The app itself is server/app.ts.
//
//   HOST (127.0.0.1)  PORT (3000; 0 takes any free port)  SKEWSMITH_BUILD_DIR (build)
//
// Once listening it prints one JSON line, {"msg":"listening","url":…}, with the real port. Without APP_URL it
// takes that address as APP_URL. SIGTERM or SIGINT stop it cleanly: no new connections, answers in flight may
// finish (up to 10 s), then the database pool closes.
import { createServer } from "node:http";
import path from "node:path";
import { pathToFileURL } from "node:url";

const mode = process.env.NODE_ENV === "development" ? "development" : "production";
process.env.NODE_ENV = mode;
const host = process.env.HOST || "127.0.0.1";
const port = Number(process.env.PORT ?? 3000);
const buildDir = path.resolve(process.env.SKEWSMITH_BUILD_DIR || "build");

function line(level, msg, fields = {}) {
  process.stdout.write(`${JSON.stringify({ time: new Date().toISOString(), level, msg, ...fields })}\n`);
}

// The app is made once the port is known (APP_URL may be derived from it); requests wait for it.
let makeApp;
let shutdown = async () => {};
let vite;
if (mode === "development") {
  const { createServer: createVite } = await import("vite");
  vite = await createVite({ server: { middlewareMode: true }, appType: "custom" });
  const server = await vite.ssrLoadModule("/server/app.ts");
  makeApp = () =>
    server.createApp({ mode, assets: vite.middlewares, loadBuild: () => vite.ssrLoadModule("virtual:react-router/server-build") });
  shutdown = server.shutdown;
} else {
  const server = await import(pathToFileURL(path.join(buildDir, "server/index.js")).href);
  makeApp = () => server.createApp({ mode, clientDir: path.join(buildDir, "client") });
  shutdown = server.shutdown;
}

let resolveApp;
const appReady = new Promise((resolve) => (resolveApp = resolve));
const http = createServer((req, res) => {
  appReady.then((app) => app(req, res));
});
// Slow or stalled clients cannot hold connections open for long.
http.headersTimeout = 20_000;
http.requestTimeout = 60_000;
// Idle keep-alive connections stay open a minute (common practice behind proxies): a client that reuses one just as
// the server drops it sees a reset, and a longer idle window makes that race rare; idle sockets cost little.
http.keepAliveTimeout = 65_000;

http.on("error", (error) => {
  line("error", "the server could not listen", { host, port, error: { code: error.code, message: error.message } });
  process.exit(1);
});

http.listen(port, host, () => {
  const address = http.address();
  const url = `http://${host.includes(":") ? `[${host}]` : host}:${address.port}`;
  process.env.APP_URL ||= url;
  try {
    resolveApp(makeApp());
  } catch (error) {
    // A missing or bad setting: say which, and stop (scripts/start and the tests show this line).
    line("error", "the app cannot start", { error: { message: error.message } });
    process.exit(1);
  }
  line("info", "listening", { url, appUrl: process.env.APP_URL, mode });
});

let stopping = false;
async function stop(signal) {
  if (stopping) return;
  stopping = true;
  line("info", "stopping", { signal });
  const force = setTimeout(() => {
    line("warn", "answers still in flight after 10 s; closing their connections");
    http.closeAllConnections();
  }, 10_000);
  force.unref();
  await new Promise((resolve) => {
    http.close(resolve);
    http.closeIdleConnections();
  });
  await shutdown().catch(() => {});
  await vite?.close();
  line("info", "stopped");
  process.exit(0);
}
process.once("SIGTERM", () => void stop("SIGTERM"));
process.once("SIGINT", () => void stop("SIGINT"));
