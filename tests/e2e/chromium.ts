/** Debian's Chromium and the flags it needs headless in a container (no sandbox, no GPU, nothing that calls home). */
export const CHROMIUM = process.env.SKEWSMITH_CHROMIUM ?? "/usr/bin/chromium";

export const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];
