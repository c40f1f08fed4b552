#!/usr/bin/env bash
# Re-runs every reference script, each with the outside library it names, and writes its fixture to
# tests/reference/fixtures/<script name>.json. npm test runs this before Vitest, so a fixture can never drift from
# its source. Usage: bash tests/reference/run.sh [NAME ...]   (default: all scripts)
# Order: R, then Python, then Octave scripts — octave_pwelch.m reads the series scipy_spectra.py resampled.
set -euo pipefail
cd "$(dirname "$0")"
out=fixtures
mkdir -p "$out"
shopt -s nullglob
scripts=("$@")
[ ${#scripts[@]} -eq 0 ] && scripts=(*.R *.py *.m)
status=0
for s in "${scripts[@]}"; do
  name="${s%.*}"
  case "$s" in
    *.R) cmd=(Rscript --vanilla "$s" "$out/$name.json") ;;
    *.py) cmd=(/usr/bin/python3 "$s" "$out/$name.json") ;;
    *.m) cmd=(octave-cli --no-gui --quiet --norc "$s" "$out/$name.json") ;;
    *) continue ;;
  esac
  start=$(date +%s)
  if "${cmd[@]}" > "/tmp/corvane-ref-$name.log" 2>&1; then
    printf 'reference %-28s ok (%ss)\n' "$name" "$(( $(date +%s) - start ))"
  else
    printf 'reference %-28s FAILED — see /tmp/corvane-ref-%s.log\n' "$name" "$name"
    tail -n 20 "/tmp/corvane-ref-$name.log"
    status=1
  fi
done
# Say which fixtures differ from the committed ones (a library update or a changed script); the tests use the
# fresh ones either way.
if command -v git >/dev/null 2>&1 && git rev-parse --is-inside-work-tree >/dev/null 2>&1; then
  changed=$(git status --porcelain -- "$out" 2>/dev/null | awk '{print $2}')
  [ -n "$changed" ] && printf 'reference fixtures differing from the last commit:\n%s\n' "$changed"
fi
exit $status
