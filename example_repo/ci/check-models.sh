#!/bin/sh
# CI gate for the .plant models (Hollin Vale line-2 controls repository, demo).
#
# Runs plantlint as a regression gate against the base branch:
#   * findings that already exist at BASE_REF are "known" and do not fail the job;
#   * findings introduced by this change fail the job when they are at or above the
#     fail level configured in plantlint.toml (fail-on = "error");
#   * findings that disappeared are reported as "fixed".
# The SARIF report (plantlint.sarif) is for the CI system's code-scanning upload; the
# findings also go to the job log, one line each (path:line:col: ...).
#
# Environment:
#   BASE_REF   git revision to compare with (default: origin/main). The CI checkout must
#              contain it: fetch the base branch (no shallow clone of depth 1).
#
# Exit code (plantlint's):
#   0  nothing introduced at or above the fail level, and everything checked
#   1  the change introduced findings at or above the fail level, or something could not
#      be checked or decided (a model cut short by its budget, a claim not decided)
#   2  usage or configuration error (bad option, bad plantlint.toml, unknown BASE_REF, ...)
set -eu

cd "$(dirname "$0")/.."

base_ref="${BASE_REF:-origin/main}"

# A report left from an earlier run must not be uploaded as this run's.
rm -f plantlint.sarif

# One run: the SARIF report goes to the file and, because it goes to a file, the findings
# are also printed one per line (path:line:col: ...) for the job log. `set -e` would stop
# the script at a non-zero exit: capture the status instead.
status=0
plantlint check --since "$base_ref" --format sarif --output plantlint.sarif models || status=$?

case "$status" in
  0) echo "plantlint: no new findings at or above the fail level" ;;
  1) echo "plantlint: this change introduces findings, or something could not be checked (see above and plantlint.sarif)" >&2 ;;
  *) echo "plantlint: usage or configuration error (exit $status)" >&2 ;;
esac
exit "$status"
