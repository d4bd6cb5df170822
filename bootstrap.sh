#!/usr/bin/env bash
# Set up everything acceptance needs, then build the demo or run the tests.
#
#   ./bootstrap.sh demo   set up, build demo_job/ into demo_site/ and print where to open it
#   ./bootstrap.sh test   set up (with test tools), type-check the package, run the whole test suite
#
# System libraries for WeasyPrint (Pango; HarfBuzz's subsetter, without which font
# embedding silently falls back to a path 2-3x slower) and fonts are installed with
# apt-get where it is available; elsewhere the script says what is missing.
set -euo pipefail
cd "$(dirname "$0")"

mode="${1:-}"
case "$mode" in
  demo|test) ;;
  *) echo "usage: ./bootstrap.sh demo|test" >&2; exit 2 ;;
esac

system_packages=(libpango-1.0-0 libpangoft2-1.0-0 libharfbuzz0b libharfbuzz-subset0 fonts-dejavu-core)
if [ "$mode" = test ]; then
  # chromium: the browser tests drive Debian's /usr/bin/chromium through Playwright (from the
  # test extra); Playwright's own browser download is never used. qpdf checks the structure
  # of the PDFs we join ourselves, as an independent reader.
  system_packages+=(poppler-utils chromium qpdf)
  export PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1
fi

missing=()
for package in "${system_packages[@]}"; do
  dpkg-query -W -f='${Status}' "$package" 2>/dev/null | grep -q "install ok installed" \
    || missing+=("$package")
done
if [ "${#missing[@]}" -gt 0 ]; then
  if command -v apt-get >/dev/null 2>&1; then
    sudo_cmd=()
    [ "$(id -u)" -ne 0 ] && sudo_cmd=(sudo)
    echo "installing system packages: ${missing[*]}" >&2
    "${sudo_cmd[@]}" apt-get update -qq
    DEBIAN_FRONTEND=noninteractive "${sudo_cmd[@]}" apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
  else
    echo "warning: apt-get is not available; install these (or your system's equivalents) yourself:" >&2
    echo "  ${missing[*]}" >&2
    echo "  WeasyPrint needs Pango >= 1.44; without HarfBuzz's subset library PDFs are slower to write." >&2
  fi
fi

python="${PYTHON:-python3}"
if ! "$python" -c 'import sys; sys.exit(sys.version_info < (3, 11))' 2>/dev/null; then
  echo "error: acceptance needs Python 3.11 or newer ($python is $("$python" --version 2>&1))" >&2
  exit 2
fi
if [ ! -x .venv/bin/python ]; then
  "$python" -m venv .venv
fi
extras=""
[ "$mode" = test ] && extras="[test]"
.venv/bin/python -m pip install --quiet --disable-pip-version-check --upgrade pip >/dev/null
.venv/bin/python -m pip install --quiet --disable-pip-version-check -e ".${extras}"
# pip compiles an installed wheel to bytecode but not an editable source tree; without this,
# a shell with PYTHONDONTWRITEBYTECODE set compiles the tool on every start.
.venv/bin/python -m compileall -q acceptance >/dev/null

if [ "$mode" = demo ]; then
  exec .venv/bin/acceptance build demo_job -o demo_site
else
  # Types first: a wrong shape between the layers fails in seconds, before the long suite.
  .venv/bin/mypy acceptance
  exec .venv/bin/python -m pytest -q
fi
