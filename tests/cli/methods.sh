# methods.sh - `saltpan methods`: exit codes, --help, -o (atomic), and that the LaTeX compiles
# (with pdflatex when it is installed; skipped with a message otherwise).
source "$(dirname "$0")/lib/common.bash"

clean_spec "$TMP/clean.saltpan"
error_spec "$TMP/error.saltpan"

# Help and usage errors.
expect_rc help 0 methods --help
expect_grep help out "^usage: saltpan methods"
expect_grep help out "not for clinical or diagnostic decisions"
expect_rc help-cmd 0 help methods
cmp -s "$TMP/help.out" "$TMP/help-cmd.out" || fail "help-cmd: 'saltpan help methods' differs from --help"
expect_rc top-help 0 --help
expect_grep top-help out "^  methods FILE"
expect_rc version 0 methods --version
expect_grep version out "^saltpan "
expect_rc nofile 64 methods
expect_grep nofile err "no spec file given"
expect_rc twofiles 64 methods "$TMP/clean.saltpan" "$TMP/clean.saltpan"
expect_rc badformat 64 methods --format html "$TMP/clean.saltpan"
expect_grep badformat err "markdown' or 'latex'"
expect_rc noformat 64 methods "$TMP/clean.saltpan" --format
expect_rc unknown 64 methods --frobnicate "$TMP/clean.saltpan"
expect_rc fragment-md 64 methods --fragment "$TMP/clean.saltpan"
expect_rc noout 64 methods "$TMP/clean.saltpan" -o

# Specs with errors, or missing: 65 and nothing on stdout.
expect_rc error 65 methods "$TMP/error.saltpan"
[ -s "$TMP/error.out" ] && fail "error: printed a description for a spec with errors"
expect_grep error err "error"
expect_rc missing 65 methods "$TMP/does-not-exist.saltpan"

# Markdown (the default) and LaTeX.
expect_rc md 0 methods "$TMP/clean.saltpan"
expect_grep md out "^# Methods: CliCell"
expect_grep md out "^\| Ion \| \\\$z\\\$ \|"
expect_grep md out "inside minus outside"
expect_grep md out 'has the hash `sha256:[0-9a-f]{64}`'
expect_grep md out "not for clinical or diagnostic decisions"
expect_rc md2 0 methods --format markdown "$TMP/clean.saltpan"
cmp -s "$TMP/md.out" "$TMP/md2.out" || fail "md2: --format markdown differs from the default"
expect_rc md3 0 methods "$TMP/clean.saltpan"
cmp -s "$TMP/md.out" "$TMP/md3.out" || fail "md3: two runs differ"

expect_rc tex 0 methods --format latex "$TMP/clean.saltpan"
[ "$(head -1 "$TMP/tex.out")" = '\documentclass{article}' ] || fail "tex: does not start with \\documentclass{article}"
[ "$(tail -1 "$TMP/tex.out")" = '\end{document}' ] || fail "tex: does not end with \\end{document}"
[ "$(grep -c '\\usepackage' "$TMP/tex.out")" = 1 ] || fail "tex: uses packages besides amsmath"
expect_grep tex out '^\\usepackage\{amsmath\}$'
expect_rc frag 0 methods --format=latex --fragment "$TMP/clean.saltpan"
grep -q 'documentclass\|begin{document}' "$TMP/frag.out" && fail "frag: a fragment has a preamble"
expect_grep frag out '^\\section\*\{Methods: CliCell\}'

# -o writes the same text, atomically: no temporary left, an existing file is replaced by rename.
mkdir "$TMP/out"
expect_rc file 0 methods --format latex -o "$TMP/out/methods.tex" "$TMP/clean.saltpan"
[ -s "$TMP/file.out" ] && fail "file: -o also printed to stdout"
cmp -s "$TMP/tex.out" "$TMP/out/methods.tex" || fail "file: the file differs from stdout output"
[ "$(ls -A "$TMP/out")" = "methods.tex" ] || fail "file: stray files: $(ls -A "$TMP/out")"
printf 'old contents\n' >"$TMP/out/replace.md"
ln "$TMP/out/replace.md" "$TMP/out/old-link.md"
expect_rc replace 0 methods -o "$TMP/out/replace.md" "$TMP/clean.saltpan"
cmp -s "$TMP/md.out" "$TMP/out/replace.md" || fail "replace: new file incomplete"
[ "$(cat "$TMP/out/old-link.md")" = "old contents" ] || fail "replace: the old file was overwritten in place"
expect_rc nodir 73 methods -o "$TMP/no/such/dir/methods.md" "$TMP/clean.saltpan"
expect_grep nodir err "^saltpan: "
printf 'keep me\n' >"$TMP/out/keep.md"
expect_rc error-o 65 methods -o "$TMP/out/keep.md" "$TMP/error.saltpan"
[ "$(cat "$TMP/out/keep.md")" = "keep me" ] || fail "error-o: the output file was touched"

# The LaTeX compiles: the clean spec and the shipped specs as documents, and a fragment
# wrapped in a minimal document.
if command -v pdflatex >/dev/null 2>&1; then
  mkdir "$TMP/tex"
  cp "$TMP/tex.out" "$TMP/tex/clean.tex"
  for spec in reference/squid_axon_1952 demo/tidewater_cell; do
    name=$(basename "$spec")
    expect_rc "tex-$name" 0 methods --format latex -o "$TMP/tex/$name.tex" "$SRC/specs/$spec.saltpan"
  done
  {
    printf '\\documentclass{article}\n\\usepackage{amsmath}\n\\begin{document}\n'
    cat "$TMP/frag.out"
    printf '\\end{document}\n'
  } >"$TMP/tex/fragment.tex"
  for doc in clean squid_axon_1952 tidewater_cell fragment; do
    if ! (cd "$TMP/tex" && timeout 60 pdflatex -halt-on-error -interaction=nonstopmode "$doc.tex" >"$doc.pdflatex.log" 2>&1); then
      fail "pdflatex: $doc.tex does not compile"
      grep -A3 '^!' "$TMP/tex/$doc.log" | head -10 | sed 's/^/    /' >&2
    fi
    [ -s "$TMP/tex/$doc.pdf" ] || fail "pdflatex: no $doc.pdf"
  done
else
  echo "SKIP: pdflatex not found; the LaTeX compile check was skipped (install texlive-latex-base)" >&2
fi

finish
