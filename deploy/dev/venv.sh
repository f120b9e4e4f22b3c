#!/usr/bin/env bash
# Creates or updates the Python reference env (the outside libraries the science tests compare
# against) at .cache/venv from test/reference/requirements.txt. Cached: a stamp of the requirements
# and the interpreter version skips pip when nothing changed. Test-only; never a runtime dependency.
#
#   deploy/dev/venv.sh            create/update, print the venv's python path on the last line
# Environment: REEFD_VENV (default <repo>/.cache/venv), REEFD_PYTHON (interpreter to build it with).
set -euo pipefail

HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
REPO="$(cd "$HERE/../.." && pwd)"
VENV="${REEFD_VENV:-$REPO/.cache/venv}"
REQ="$REPO/test/reference/requirements.txt"
# scipy 1.18 and numpy 2.5 (pinned in requirements.txt) need Python 3.12 or newer.
MIN_MINOR=12

log() { printf '[venv] %s\n' "$*" >&2; }
die() {
  printf '[venv] ERROR: %s\n' "$*" >&2
  exit 1
}

new_enough() { "$1" -c "import sys; sys.exit(0 if sys.version_info >= (3, $MIN_MINOR) else 1)" 2>/dev/null; }

pick_python() {
  local c candidates=()
  [[ -n "${REEFD_PYTHON:-}" ]] && candidates+=("$REEFD_PYTHON")
  # pyenv-installed interpreters are not on PATH unless selected; look for them directly.
  local root="${PYENV_ROOT:-$HOME/.pyenv}"
  for c in "$root"/versions/3.12.*/bin/python3 "$root"/versions/3.13.*/bin/python3; do
    [[ -x "$c" ]] && candidates+=("$c")
  done
  for c in python3.12 python3.13 python3.14 python3; do
    command -v "$c" >/dev/null 2>&1 && candidates+=("$(command -v "$c")")
  done
  for c in "${candidates[@]}"; do
    if new_enough "$c"; then
      echo "$c"
      return 0
    fi
  done
  die "no Python >= 3.$MIN_MINOR found (tried: ${candidates[*]:-none}); install one (e.g. apt-get install python3.12 where available, or pyenv) or set REEFD_PYTHON"
}

[[ -f "$REQ" ]] || die "missing $REQ"
stamp_file="$VENV/.reefd-requirements.stamp"

if [[ -x "$VENV/bin/python" ]] && new_enough "$VENV/bin/python"; then
  want="$(sha256sum "$REQ" | cut -d' ' -f1) $("$VENV/bin/python" -V 2>&1)"
  if [[ -f "$stamp_file" && "$(cat "$stamp_file")" == "$want" ]]; then
    log "up to date: $VENV ($("$VENV/bin/python" -V 2>&1))"
    echo "$VENV/bin/python"
    exit 0
  fi
else
  py="$(pick_python)"
  log "creating $VENV with $py ($("$py" -V 2>&1))"
  mkdir -p "$(dirname "$VENV")"
  "$py" -m venv --clear "$VENV"
fi

log "pip install -r test/reference/requirements.txt (log: $VENV/pip-install.log)"
if ! "$VENV/bin/python" -m pip install --disable-pip-version-check --no-input -q -r "$REQ" \
  >"$VENV/pip-install.log" 2>&1; then
  tail -n 20 "$VENV/pip-install.log" >&2
  die "pip install failed (full log: $VENV/pip-install.log)"
fi
echo "$(sha256sum "$REQ" | cut -d' ' -f1) $("$VENV/bin/python" -V 2>&1)" >"$stamp_file"
log "ready: $VENV"
echo "$VENV/bin/python"
