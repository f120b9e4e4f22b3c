#!/usr/bin/env bash
# Re-runs every reference-vector generator with the Python reference env.
#
#   test/reference/regenerate.sh           overwrite test/reference/vectors/<topic>.json
#   test/reference/regenerate.sh --check   compare instead; exit 1 on drift (CI, `npm run test:reference`)
#
# Convention: test/reference/<topic>/generate.py takes the output path as argv[1] and writes one
# JSON file; the committed copy is test/reference/vectors/<topic>.json. Numbers are compared with
# a relative tolerance (REEFD_REF_RTOL, default 1e-12), not bytewise, so float formatting noise
# does not count as drift; everything else (keys, lengths, strings, booleans, null) must match exactly.
# Python: REEFD_VENV_PYTHON, else .cache/venv/bin/python (made by deploy/dev/venv.sh).
set -euo pipefail

REPO="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
REF="$REPO/test/reference"
VECTORS="$REF/vectors"
RTOL="${REEFD_REF_RTOL:-1e-12}"

check=0
case "${1:-}" in
  --check) check=1 ;;
  "") ;;
  *)
    echo "usage: $0 [--check]" >&2
    exit 2
    ;;
esac

shopt -s nullglob
generators=("$REF"/*/generate.py)
if ((${#generators[@]} == 0)); then
  echo "reference: no generators (test/reference/*/generate.py) yet; nothing to do"
  exit 0
fi

PY="${REEFD_VENV_PYTHON:-$REPO/.cache/venv/bin/python}"
if [[ ! -x "$PY" ]]; then
  echo "reference: ERROR: no Python reference env at $PY; create it with deploy/dev/venv.sh" >&2
  exit 1
fi

tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT

# compare.py COMMITTED FRESH: prints a summary of differences, exit 1 if any.
cat >"$tmp/compare.py" <<'PYEOF'
import json, math, sys

rtol = float(sys.argv[3])
diffs = []
count = 0

def walk(a, b, path):
    global count
    if len(diffs) > 1000:
        return
    if isinstance(a, bool) or isinstance(b, bool) or a is None or b is None or isinstance(a, str) or isinstance(b, str):
        if type(a) is not type(b) or a != b:
            diffs.append((path, a, b, None))
        return
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        count += 1
        if isinstance(a, float) and isinstance(b, float) and math.isnan(a) and math.isnan(b):
            return
        if a == b:
            return
        scale = max(abs(a), abs(b))
        rel = abs(a - b) / scale if scale > 0 and math.isfinite(scale) else math.inf
        if not rel <= rtol:
            diffs.append((path, a, b, rel))
        return
    if isinstance(a, dict) and isinstance(b, dict):
        for k in sorted(set(a) | set(b)):
            if k not in a:
                diffs.append((f"{path}.{k}", "<absent>", "<present>", None))
            elif k not in b:
                diffs.append((f"{path}.{k}", "<present>", "<absent>", None))
            else:
                walk(a[k], b[k], f"{path}.{k}")
        return
    if isinstance(a, list) and isinstance(b, list):
        if len(a) != len(b):
            diffs.append((f"{path}", f"<{len(a)} items>", f"<{len(b)} items>", None))
        for i, (x, y) in enumerate(zip(a, b)):
            walk(x, y, f"{path}[{i}]")
        return
    diffs.append((path, type(a).__name__, type(b).__name__, None))

with open(sys.argv[1]) as fh:
    committed = json.load(fh)
with open(sys.argv[2]) as fh:
    fresh = json.load(fh)
walk(committed, fresh, "$")
if diffs:
    worst = max((d[3] for d in diffs if d[3] is not None and math.isfinite(d[3])), default=None)
    print(f"  {len(diffs)}{'+' if len(diffs) > 1000 else ''} difference(s) among {count} numbers"
          + (f"; worst relative difference {worst:.3e}" if worst is not None else "")
          + f" (tolerance {rtol:g}):")
    for path, a, b, rel in diffs[:15]:
        extra = f"  (rel {rel:.3e})" if rel is not None else ""
        print(f"    {path}: committed {a!r}, regenerated {b!r}{extra}")
    if len(diffs) > 15:
        print(f"    ... and {len(diffs) - 15} more")
    sys.exit(1)
print(f"  {count} numbers agree within {rtol:g}")
PYEOF

echo "reference: $("$PY" -V 2>&1) at $PY; $((${#generators[@]})) generator(s)"
failed=()
for gen in "${generators[@]}"; do
  topic="$(basename "$(dirname "$gen")")"
  out="$tmp/$topic.json"
  committed="$VECTORS/$topic.json"
  start=$SECONDS
  if ! (cd "$REPO" && "$PY" "$gen" "$out") >"$tmp/$topic.log" 2>&1; then
    echo "reference: $topic: FAILED: generator exited non-zero:"
    tail -n 20 "$tmp/$topic.log" | sed 's/^/  /'
    failed+=("$topic")
    continue
  fi
  if [[ ! -s "$out" ]]; then
    echo "reference: $topic: FAILED: test/reference/$topic/generate.py wrote nothing to argv[1]"
    failed+=("$topic")
    continue
  fi
  if ((check)); then
    if [[ ! -f "$committed" ]]; then
      echo "reference: $topic: FAILED: no committed test/reference/vectors/$topic.json; run test/reference/regenerate.sh and commit it"
      failed+=("$topic")
    elif "$PY" "$tmp/compare.py" "$committed" "$out" "$RTOL" >"$tmp/$topic.cmp" 2>&1; then
      echo "reference: $topic: ok ($((SECONDS - start))s)$(sed -n 1p "$tmp/$topic.cmp" | sed 's/^ */; /')"
    else
      echo "reference: $topic: DRIFT: regenerated vectors differ from test/reference/vectors/$topic.json"
      cat "$tmp/$topic.cmp"
      failed+=("$topic")
    fi
  else
    mkdir -p "$VECTORS"
    cp "$out" "$committed"
    echo "reference: $topic: wrote test/reference/vectors/$topic.json ($((SECONDS - start))s)"
  fi
done

if ((${#failed[@]} > 0)); then
  echo "reference: FAILED: ${failed[*]}"
  exit 1
fi
echo "reference: all ${#generators[@]} generator(s) $( ((check)) && echo "match their committed vectors" || echo "written")"
