# single_definitions.sh - what the tree defines once: the version (support/Version.h.in, no
# fallback `#ifndef SALTPAN_VERSION` or -DSALTPAN_VERSION anywhere) and the exit codes
# (support/ExitCode.h).
source "$(dirname "$0")/lib/common.bash"

cd "$SRC"
sources=$(git ls-files 2>/dev/null || find . -type f -not -path './build*' -not -path './.git/*')
[ -n "$sources" ] || fail "no source files found in $SRC"
code=$(echo "$sources" | grep -E '\.(h|cpp|c|in|txt|cmake)$' || true)

# found WHAT PATTERN ALLOWED: every file matching PATTERN must be ALLOWED.
found() {
  local what=$1 pattern=$2 allowed=$3 f
  for f in $(echo "$code" | xargs grep -lE -- "$pattern" 2>/dev/null || true); do
    [ "$f" = "$allowed" ] || fail "$f: $what (only $allowed may have it)"
  done
}

found "defines SALTPAN_VERSION" '#[[:space:]]*(define|ifndef|ifdef)[[:space:]]+SALTPAN_VERSION|-DSALTPAN_VERSION' \
  support/Version.h.in
found "declares an exit-code enum" 'enum[[:space:]]+(class[[:space:]]+)?ExitCode' support/ExitCode.h
grep -q 'define SALTPAN_VERSION "@PROJECT_VERSION@"' support/Version.h.in ||
  fail "support/Version.h.in does not define SALTPAN_VERSION from the project version"
finish
