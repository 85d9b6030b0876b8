#!/bin/sh
# CI gate for the .plant models (Hollin Vale line-2 controls repository, demo).
#
# Runs plantlint as a regression gate against the base branch:
#   * findings that already exist at BASE_REF are "known" and do not fail the job;
#   * findings introduced by this change fail the job when they are at or above the
#     fail level configured in plantlint.toml (fail-on = "error");
#   * findings that disappeared are reported as "fixed".
# The SARIF report (plantlint.sarif) is for the CI system's code-scanning upload; the
# one-line report (--format lines) goes to the job log, one line per finding (path:line:col: ...).
#
# Environment:
#   BASE_REF   git revision to compare with (default: origin/main). The CI checkout must
#              contain it: fetch the base branch (no shallow clone of depth 1).
#
# Exit code (plantlint's, from the SARIF run):
#   0  nothing introduced at or above the fail level
#   1  the change introduced findings at or above the fail level
#   2  usage or configuration error (bad option, bad plantlint.toml, unknown BASE_REF, ...)
set -eu

cd "$(dirname "$0")/.."

base_ref="${BASE_REF:-origin/main}"

# `set -e` would stop the script at the first non-zero exit: capture the status instead.
# (When the report goes to a file plantlint also prints a short summary; it is dropped
# here because the --format lines run below writes the log.)
status=0
plantlint check --since "$base_ref" --format sarif --output plantlint.sarif models >/dev/null \
  || status=$?

# Human-readable report for the log. The result cache makes this second run cheap.
# Its exit status is ignored: the gate's verdict is the SARIF run's.
plantlint check --since "$base_ref" --format lines models || true

case "$status" in
  0) echo "plantlint: no new findings at or above the fail level" ;;
  1) echo "plantlint: this change introduces findings (see above and plantlint.sarif)" >&2 ;;
  *) echo "plantlint: usage or configuration error (exit $status)" >&2 ;;
esac
exit "$status"
