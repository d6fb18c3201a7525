#!/usr/bin/env bash
# Reruns tests/reference/modal_reference.py and response_reference.py with the pinned numpy and scipy
# (tests/reference/requirements.txt) into a temporary folder and compares the result with the
# committed fixtures in tests/reference/modal/ and response/. Exit 0 when they agree, 1 when they differ,
# 2 when the reference environment cannot be set up.
#
# The Python environment lives in $SPRUNG_REFERENCE_VENV (default: .venv at the repository
# root, ignored by git); it is created and the pinned versions installed when missing.
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
root="$(cd "$here/../.." && pwd)"
venv="${SPRUNG_REFERENCE_VENV:-$root/.venv}"
python="$venv/bin/python"

pinned_ok() {
    "$python" - "$here/requirements.txt" <<'PY' 2>/dev/null
import sys
from importlib.metadata import version
for line in open(sys.argv[1]):
    line = line.strip()
    if line and not line.startswith("#"):
        name, want = line.split("==")
        if version(name) != want:
            sys.exit(1)
PY
}

if [ ! -x "$python" ]; then
    python3 -m venv "$venv" || { echo "check.sh: cannot create a venv at $venv" >&2; exit 2; }
fi
if ! pinned_ok; then
    "$python" -m pip install --quiet --disable-pip-version-check -r "$here/requirements.txt" \
        || { echo "check.sh: cannot install the pinned numpy/scipy" >&2; exit 2; }
fi

tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
export OPENBLAS_NUM_THREADS=1 OMP_NUM_THREADS=1
"$python" "$here/modal_reference.py" --out "$tmp/modal"
"$python" "$here/modal_reference.py" --compare "$here/modal" "$tmp/modal"
"$python" "$here/response_reference.py" --out "$tmp/response"
"$python" "$here/response_reference.py" --compare "$here/response" "$tmp/response"
