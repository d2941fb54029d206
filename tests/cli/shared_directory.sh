# shared_directory.sh - links that another local user plants in a shared sticky directory
# (like /tmp) never redirect a write: not the output's temporary (its name was once
# OUT.tmp-PID), not the sweep journal OUT.journal, not `fmt`. Run as root (against a planted
# link by 'nobody') and as an unprivileged user (against another uid); needs root to switch
# users, so it is skipped (77) otherwise.
source "$(dirname "$0")/lib/common.bash"

[ "$(id -u)" -eq 0 ] || { echo "skipped: needs root to create the other users"; exit 77; }
command -v setpriv >/dev/null || { echo "skipped: no setpriv"; exit 77; }

chmod 711 "$TMP"
cd "$TMP"
clean_spec spec.saltpan
cat >>spec.saltpan <<'SPEC'
protocol short {
  method exponential_euler step 25 us
  duration 2 ms
  record soma.V every 0.5 ms
}
sweep gated {
  vary soma.KGated.density from 20 mS/cm2 to 40 mS/cm2 points 4
  measure short: peak(soma.V)
}
SPEC
chmod 644 spec.saltpan

# scenario LABEL VICTIM_UID ATTACKER_UID: saltpan runs as VICTIM_UID (0 is root) in a sticky
# directory where ATTACKER_UID plants links to the victim's files.
scenario() {
  local label=$1 victim=$2 attacker=$3
  local as_victim=() as_attacker=(setpriv --reuid="$attacker" --regid="$attacker" --clear-groups --)
  [ "$victim" -eq 0 ] || as_victim=(setpriv --reuid="$victim" --regid="$victim" --clear-groups --)
  local shared="$TMP/shared-$label" home="$TMP/home-$label"
  mkdir -m 1777 "$shared"
  mkdir -m 700 "$home"
  echo precious >"$home/victim"
  echo precious >"$home/victim2"
  chown -R "$victim:$victim" "$home"

  # The old temporary name: planted for the PID the run will have (exec keeps the PID).
  (
    "${as_attacker[@]}" ln -s "$home/victim" "$shared/out.csv.tmp-$BASHPID"
    exec "${as_victim[@]}" "$SALTPAN" run "$TMP/spec.saltpan" -o "$shared/out.csv" 2>"$TMP/$label.tmp.err"
  ) || fail "$label: the run failed: $(cat "$TMP/$label.tmp.err")"
  [ "$(cat "$home/victim")" = precious ] || fail "$label: a planted temporary link made saltpan overwrite the victim"
  grep -q "^time (ms)" "$shared/out.csv" || fail "$label: the output was not written"

  # The journal: a planted link is not followed and the sweep is refused (73).
  "${as_attacker[@]}" ln -s "$home/victim2" "$shared/s.csv.journal"
  rc=0
  "${as_victim[@]}" "$SALTPAN" sweep --progress none "$TMP/spec.saltpan" -o "$shared/s.csv" \
    >"$TMP/$label.journal.out" 2>"$TMP/$label.journal.err" || rc=$?
  [ "$rc" -eq 73 ] || fail "$label: a planted journal link gave exit $rc, expected 73"
  grep -q "cannot write the checkpoint journal '.*s\.csv\.journal': it is a symbolic link" "$TMP/$label.journal.err" ||
    fail "$label: no clear message for the planted journal link: $(cat "$TMP/$label.journal.err")"
  [ "$(cat "$home/victim2")" = precious ] || fail "$label: the planted journal link made saltpan overwrite the victim"

  # A journal file the other user wrote (it could hold forged points) is not resumed.
  "${as_attacker[@]}" sh -c "printf '{}\n' >'$shared/f.csv.journal'"
  rc=0
  "${as_victim[@]}" "$SALTPAN" sweep --progress none "$TMP/spec.saltpan" -o "$shared/f.csv" \
    >"$TMP/$label.foreign.out" 2>"$TMP/$label.foreign.err" || rc=$?
  [ "$rc" -eq 73 ] || fail "$label: another user's journal gave exit $rc, expected 73"
  grep -q "it belongs to another user" "$TMP/$label.foreign.err" ||
    fail "$label: no clear message for another user's journal: $(cat "$TMP/$label.foreign.err")"

  # fmt does not write through a link another user planted in the sticky directory.
  printf 'const  a = 1 mV\n' >"$home/unformatted.saltpan"
  chown "$victim:$victim" "$home/unformatted.saltpan"
  cp "$home/unformatted.saltpan" "$TMP/unformatted.orig"
  "${as_attacker[@]}" ln -s "$home/unformatted.saltpan" "$shared/spec.saltpan"
  rc=0
  "${as_victim[@]}" "$SALTPAN" fmt "$shared/spec.saltpan" >"$TMP/$label.fmt.out" 2>"$TMP/$label.fmt.err" || rc=$?
  [ "$rc" -eq 73 ] || fail "$label: fmt through a planted link gave exit $rc, expected 73"
  grep -q "is a symbolic link that another user (uid $attacker) made in a shared sticky directory" "$TMP/$label.fmt.err" ||
    fail "$label: no clear message for fmt's planted link: $(cat "$TMP/$label.fmt.err")"
  [ -L "$shared/spec.saltpan" ] || fail "$label: fmt replaced the planted link"
  cmp -s "$home/unformatted.saltpan" "$TMP/unformatted.orig" || fail "$label: fmt wrote through the planted link"
}

scenario root 0 65534
scenario user 65534 54321

finish
