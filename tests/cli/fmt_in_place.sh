# fmt_in_place.sh - `saltpan fmt` rewrites through the one safe-write routine: the file keeps
# its mode, owner and group; a read-only file or one with several hard links is refused
# unless --force; a symbolic link is followed and its target rewritten (the link stays).
source "$(dirname "$0")/lib/common.bash"

cd "$TMP"
messy() { printf 'const  a = 1 mV\nconst b=2 mV\n' >"$1"; }
messy canonical.saltpan
"$SALTPAN" fmt canonical.saltpan 2>/dev/null || fail "fmt of a plain file failed"
cmp -s canonical.saltpan <(printf 'const  a = 1 mV\nconst b=2 mV\n') && fail "fmt did not change the messy file"

# formatted NAME: FILE is now the canonical text.
formatted() { cmp -s "$1" canonical.saltpan || fail "$2: '$1' was not formatted"; }
unformatted() { cmp -s "$1" <(printf 'const  a = 1 mV\nconst b=2 mV\n') || fail "$2: '$1' was changed"; }

# The mode stays (0600 used to become 0644).
messy private.saltpan
chmod 600 private.saltpan
expect_rc private 0 fmt private.saltpan
formatted private.saltpan private
[ "$(stat -c %a private.saltpan)" = 600 ] || fail "private: the mode became $(stat -c %a private.saltpan)"

# Read-only: refused (73) and untouched; --force rewrites it and it stays read-only.
messy readonly.saltpan
chmod 444 readonly.saltpan
expect_rc readonly 73 fmt readonly.saltpan
expect_grep readonly err "^saltpan: error: 'readonly\.saltpan' is read-only; saltpan fmt leaves it alone \(--force rewrites it"
unformatted readonly.saltpan readonly
expect_rc forced 0 fmt --force readonly.saltpan
formatted readonly.saltpan forced
[ "$(stat -c %a readonly.saltpan)" = 444 ] || fail "forced: the mode became $(stat -c %a readonly.saltpan)"

# A symbolic link: the target is formatted and the link stays a link.
mkdir specs
messy specs/target.saltpan
chmod 640 specs/target.saltpan
ln -s specs/target.saltpan link.saltpan
expect_rc symlink 0 fmt link.saltpan
[ -L link.saltpan ] || fail "symlink: the link was replaced by a file"
formatted specs/target.saltpan symlink
[ "$(stat -c %a specs/target.saltpan)" = 640 ] || fail "symlink: the target's mode became $(stat -c %a specs/target.saltpan)"

# Several hard links: refused, since only this name would get the new text; --force does that.
messy first.saltpan
ln first.saltpan second.saltpan
expect_rc hardlink 73 fmt first.saltpan
expect_grep hardlink err "'first\.saltpan' has 2 hard links; rewriting it would give only this name the new text"
unformatted first.saltpan hardlink
expect_rc hardforced 0 fmt --force first.saltpan
formatted first.saltpan hardforced
unformatted second.saltpan hardforced

# The owner and group stay (root rewriting another user's file used to take it over).
if [ "$(id -u)" -eq 0 ]; then
  messy owned.saltpan
  chown 65534:65534 owned.saltpan
  expect_rc owner 0 fmt owned.saltpan
  formatted owned.saltpan owner
  [ "$(stat -c %u:%g owned.saltpan)" = 65534:65534 ] || fail "owner: the owner became $(stat -c %u:%g owned.saltpan)"
fi
[ -z "$(find . -name '.*saltpan-*')" ] || fail "temporaries were left behind"

finish
