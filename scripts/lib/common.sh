# Shared pieces of scripts/start and scripts/test. Source it from the repository root.
# shellcheck shell=bash

PNPM_VERSION="10.34.9"
NODE_MIN_MAJOR=20

say() { printf '\033[36m[skewsmith]\033[0m %s\n' "$*" >&2; }
warn() { printf '\033[33m[skewsmith]\033[0m %s\n' "$*" >&2; }
die() {
  printf '\033[31m[skewsmith] error:\033[0m %s\n' "$*" >&2
  exit 1
}

# Runs a command as root: directly when we are root, through sudo otherwise.
as_root() {
  if [ "$(id -u)" = 0 ]; then
    "$@"
  elif command -v sudo >/dev/null 2>&1; then
    sudo "$@"
  else
    die "need root to run: $* (run as root or install sudo)"
  fi
}

ensure_node() {
  command -v node >/dev/null 2>&1 || die "Node.js ${NODE_MIN_MAJOR}.19 or newer is required (node was not found on PATH)"
  local major
  major="$(node -p 'process.versions.node.split(".")[0]')"
  [ "$major" -ge "$NODE_MIN_MAJOR" ] || die "Node.js ${NODE_MIN_MAJOR}.19 or newer is required; found $(node -v)"
}

# Installs, with apt-get, every Debian package listed in scripts/system-packages.txt that is missing.
ensure_system_packages() {
  local list="scripts/system-packages.txt" pkg missing=()
  [ -f "$list" ] || die "$list is missing"
  while IFS= read -r pkg || [ -n "$pkg" ]; do
    pkg="${pkg%%#*}"
    pkg="$(echo "$pkg" | tr -d '[:space:]')"
    [ -n "$pkg" ] || continue
    if ! dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed"; then
      missing+=("$pkg")
    fi
  done <"$list"
  if [ "${#missing[@]}" -eq 0 ]; then
    return 0
  fi
  command -v apt-get >/dev/null 2>&1 || die "missing system packages (${missing[*]}) and apt-get is not available; install them by hand"
  say "installing system packages: ${missing[*]}"
  as_root env DEBIAN_FRONTEND=noninteractive apt-get update -qq
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "${missing[@]}" >&2
}

# Installs the workspace's Node dependencies exactly as the lockfile says (quick when nothing changed).
ensure_node_modules() {
  say "installing Node dependencies (pnpm ${PNPM_VERSION})"
  npx --yes "pnpm@${PNPM_VERSION}" install --frozen-lockfile --reporter=append-only >&2 ||
    die "pnpm install failed"
}

# True when something already listens on 127.0.0.1:PORT.
port_in_use() {
  node -e '
    const s = require("net").connect({ host: "127.0.0.1", port: Number(process.argv[1]) });
    s.on("connect", () => { s.destroy(); process.exit(0); });
    s.on("error", () => process.exit(1));
  ' "$1"
}

# Fails with a clear message when something already listens on 127.0.0.1:PORT.
require_free_port() {
  local port="$1" what="$2"
  if port_in_use "$port"; then
    die "port $port (for $what) is already in use on 127.0.0.1; stop what uses it or choose another port (see README)"
  fi
}

# Waits until an HTTP URL answers 200, or fails after TIMEOUT seconds.
wait_for_http() {
  local url="$1" timeout="${2:-60}" pid="${3:-}"
  local deadline=$((SECONDS + timeout))
  until node -e '
    fetch(process.argv[1]).then((r) => process.exit(r.ok ? 0 : 1), () => process.exit(1));
  ' "$url"; do
    if [ -n "$pid" ] && ! kill -0 "$pid" 2>/dev/null; then
      die "the process serving $url exited early"
    fi
    [ "$SECONDS" -lt "$deadline" ] || die "$url did not answer within ${timeout}s"
    sleep 0.3
  done
}

# Prints a random hex secret of N bytes.
random_hex() {
  node -e 'process.stdout.write(require("crypto").randomBytes(Number(process.argv[1])).toString("hex"))' "${1:-32}"
}
