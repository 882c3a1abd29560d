#!/usr/bin/env bash
# Rebuild the golden JSON files in tests/golden/ from pinned general-purpose libraries.
#
# Creates (or reuses) a virtual environment in target/golden-venv under the repository
# root, installs the exact versions in tests/golden/requirements.txt into it, and runs
# tests/golden/generate.py, which asserts every tabulated reference value before writing.
# Needs only python3 (>= 3.11, with its venv module) and network access to PyPI.
#
# Usage: bash tests/golden/regenerate.sh      (PYTHON=/path/to/python3 to choose the interpreter)
set -euo pipefail

golden_dir="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
repo_root="$(cd "${golden_dir}/../.." && pwd)"
venv_dir="${repo_root}/target/golden-venv"
python="${PYTHON:-python3}"

if ! command -v "${python}" >/dev/null 2>&1; then
    echo "regenerate.sh: '${python}' not found; install Python >= 3.11 or set PYTHON=" >&2
    exit 1
fi
if ! "${python}" -c 'import sys; sys.exit(0 if sys.version_info >= (3, 11) else 1)'; then
    echo "regenerate.sh: the pinned numpy/scipy need Python >= 3.11;" \
        "'${python}' is $("${python}" --version 2>&1). Set PYTHON= to a newer one." >&2
    exit 1
fi

if [[ ! -x "${venv_dir}/bin/python" ]]; then
    mkdir -p "${repo_root}/target"
    if ! "${python}" -m venv "${venv_dir}"; then
        echo "regenerate.sh: could not create ${venv_dir}; on Debian/Ubuntu the venv" \
            "module is packaged separately (python3-venv)." >&2
        exit 1
    fi
fi

export PIP_DISABLE_PIP_VERSION_CHECK=1
"${venv_dir}/bin/python" -m pip install --quiet --requirement "${golden_dir}/requirements.txt"

cd "${golden_dir}"
PYTHONDONTWRITEBYTECODE=1 "${venv_dir}/bin/python" -B generate.py
