#!/usr/bin/env bash
# The real-editor tests (`npm run test:editors`, after `npm run package` has built the .vsix):
# installs the editor tools (setup.sh), then runs the Neovim test and the VS Code test, both even
# if the first fails, and exits non-zero if either failed. Artifacts: artifacts/editors/.
set -uo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
cd "$here/../.."

start=$(date +%s)
bash "$here/setup.sh" || { echo "test:editors: FAILED: setup.sh could not install the editor tools" >&2; exit 1; }
echo "setup: $(( $(date +%s) - start )) s"

passed=0; failed=0; failures=()
for t in run-nvim.mjs vscode-e2e.mjs; do
  echo "== test/editors/$t"
  t0=$(date +%s)
  if node "$here/$t"; then passed=$((passed + 1)); else failed=$((failed + 1)); failures+=("$t"); fi
  echo "$t: $(( $(date +%s) - t0 )) s"
done
echo "artifacts: artifacts/editors/"
if ((failed)); then echo "test:editors: FAILED: ${failures[*]} (see the messages above)" >&2; fi
echo "editors: $passed passed, $failed failed"
exit $((failed > 0))
