# module_confinement.sh - `use "PATH"` reads spec files only from the using spec's folder and the
# module search path (SALTPAN_MODULE_PATH): an absolute path, `..`, or a symbolic link that leads
# out is refused and the file is never quoted; a FIFO is refused without blocking; the search
# path widens the set and is searched for relative paths.
source "$(dirname "$0")/lib/common.bash"

unset SALTPAN_MODULE_PATH
cd "$TMP"
mkdir -p cell elsewhere
clean_spec elsewhere/lib.saltpan
echo "secret-token-0123456789" >elsewhere/token.saltpan

# A symbolic link inside the folder that leads out of it.
ln -s "$TMP/elsewhere/token.saltpan" cell/link.saltpan
printf 'use "link.saltpan"\n' >cell/a.saltpan
expect_rc link 65 check cell/a.saltpan
expect_grep link err "'link\.saltpan' lies outside the folder of 'cell/a\.saltpan'"
grep -q secret-token "$TMP/link.err" && fail "link: the file outside was quoted"

# An absolute path and a climb out with ..
printf 'use "%s"\n' "$TMP/elsewhere/token.saltpan" >cell/b.saltpan
expect_rc absolute 65 check cell/b.saltpan
expect_grep absolute err "lies outside the folder of"
grep -q secret-token "$TMP/absolute.err" && fail "absolute: the file outside was quoted"
printf 'use "../elsewhere/lib.saltpan"\n' >cell/c.saltpan
expect_rc climb 65 check cell/c.saltpan
expect_grep climb err "note: to use modules from another folder, list it in SALTPAN_MODULE_PATH"

# The search path allows that folder, and is searched for a relative path.
SALTPAN_MODULE_PATH="$TMP/nowhere:$TMP/elsewhere" expect_rc widened 0 check cell/c.saltpan
printf 'use "lib.saltpan"\n' >cell/d.saltpan
expect_rc unlisted 65 check cell/d.saltpan
expect_grep unlisted err "cannot find 'lib\.saltpan'"
SALTPAN_MODULE_PATH="$TMP/elsewhere" expect_rc searched 0 check cell/d.saltpan

# Only spec files: another name is refused even inside the folder; a FIFO does not block.
echo "not a spec" >cell/notes.txt
printf 'use "notes.txt"\n' >cell/e.saltpan
expect_rc notspec 65 check cell/e.saltpan
expect_grep notspec err "is not a spec file"
mkfifo cell/pipe.saltpan
printf 'use "pipe.saltpan"\n' >cell/f.saltpan
expect_rc fifo 65 check cell/f.saltpan
[ "$rc" -eq 124 ] && fail "fifo: saltpan blocked on the FIFO"

# Inside the folder, a module in a subfolder and a climb that stays inside are fine.
mkdir -p cell/parts
clean_spec cell/parts/lib.saltpan
printf 'use "parts/../parts/lib.saltpan"\n' >cell/g.saltpan
expect_rc inside 0 check cell/g.saltpan

finish
