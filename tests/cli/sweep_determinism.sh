# sweep_determinism.sh - `saltpan sweep` gives the same bytes whatever the thread count, a point's
# numbers do not depend on its lane or its neighbours, batched lanes agree with the scalar
# engine, and the scalar engine equals `saltpan run --set`.
source "$(dirname "$0")/lib/common.bash"

HH="$SRC/specs/reference/squid_axon_1952.saltpan"

cat >"$TMP/small.saltpan" <<SPEC
use "$HH"
protocol short {
  method exponential_euler step 10 us
  duration 40 ms
  inject axon 10 uA/cm2 from 0 ms to 40 ms
  record axon.V every 0.1 ms
}
sweep grid {
  vary axon.SquidSodium1952.density from 60 mS/cm2 to 180 mS/cm2 points 7
  vary axon.SquidPotassium1952.density from 18 mS/cm2 to 54 mS/cm2 points 5
  measure short: spike_count(axon.V)
  measure short: firing_rate(axon.V)
  measure short: peak(axon.V)
  measure short: mean(axon.V)
}
SPEC

# sweep NAME ARGS...: runs a sweep of small.saltpan into $TMP/NAME.csv and $TMP/NAME.json.
sweep() {
  local name=$1
  shift
  expect_rc "$name" 0 sweep --progress none -o "$TMP/$name.csv" -o "$TMP/$name.json" "$@" "$TMP/small.saltpan"
}
same() {
  local a=$1 b=$2
  for ext in csv json; do
    cmp -s "$TMP/$a.$ext" "$TMP/$b.$ext" || fail "$a.$ext and $b.$ext differ"
  done
}

# ---- the thread count changes no byte ----
sweep t1 --threads 1
sweep t2 --threads 2
same t1 t2
# The widths this CPU has: --lanes W exits 64 beyond its vectors.
widths=()
for w in 2 4 8; do
  run probe$w sweep --lanes "$w" --threads 1 --progress none --values "axon.capacitance=1uF/cm2" \
    --measure "short: spike_count(axon.V)" "$TMP/small.saltpan"
  if [ "$rc" -eq 0 ]; then
    widths+=("$w")
  elif [ "$rc" -eq 64 ]; then
    grep -q "at most" "$TMP/probe$w.err" || fail "probe$w: exit 64 without saying the CPU's width"
  else
    fail "probe$w: --lanes $w exited $rc"
  fi
done
[ "${#widths[@]}" -ge 1 ] || fail "no lane width works on this CPU"
for w in "${widths[@]}"; do
  sweep "w${w}t1" --lanes "$w" --threads 1
  sweep "w${w}t2" --lanes "$w" --threads 2
  same "w${w}t1" "w${w}t2"
  grep -q "\"engine\": \"batched, $w lanes\"" "$TMP/w${w}t1.json" || fail "w${w}t1: the engine is not 'batched, $w lanes'"
done
sweep s1 --engine scalar --threads 1
sweep s2 --engine scalar --threads 2
same s1 s2
sweep i1 --engine interpreter --threads 1
sweep i2 --engine interpreter --threads 2
same i1 i2
# The reference interpreter computes what the native scalar kernels compute.
"$PY" - "$TMP/i1.json" "$TMP/s1.json" <<'PYEOF' || fail "interpreter: disagrees with the scalar engine"
import json, sys
interp, scalar = (json.load(open(p, encoding="utf-8")) for p in sys.argv[1:])
assert interp["engine"] == "interpreter", interp["engine"]
for a, b in zip(interp["points"], scalar["points"], strict=True):
    assert a["parameters"] == b["parameters"] and a["measures"][0] == b["measures"][0], (a, b)
    for x, y in zip(a["measures"][1:], b["measures"][1:]):
        assert (x is None) == (y is None) and (x is None or abs(x - y) <= 1e-12 * abs(y)), (a, b)
PYEOF

# ---- lane independence: the same parameter value gives the same bits in any lane, beside any
# neighbours (one of them a point whose run fails) ----
values() { # values NAME WIDTH LIST: the leak reversal list, in mV
  local name=$1 width=$2 list=$3
  expect_rc "$name" 0 sweep --progress none --lanes "$width" --threads 1 \
    --values "axon.SquidLeak1952.reversal=$(echo "$list" | sed 's|,|mV,|g; s|$|mV|')" \
    --measure "short: spike_count(axon.V)" --measure "short: firing_rate(axon.V)" \
    --measure "short: peak(axon.V)" --measure "short: mean(axon.V)" -o "$TMP/$name.csv" "$TMP/small.saltpan"
}
for w in "${widths[@]}"; do
  values "fwd$w" "$w" "-60,-57,-54.387,-52,-50"
  values "rev$w" "$w" "-50,-52,-54.387,-57,-60"
  values "one$w" "$w" "-54.387"
  values "mix$w" "$w" "1e7,-50,1e7,1e7,-60,-54.387,1e7,-57,-52"
  "$PY" - "$TMP"/{fwd,rev,one,mix}"$w".csv <<'PYEOF' || fail "lanes $w: a point's numbers depend on its lane"
import csv, sys
by_value = {}
for path in sys.argv[1:]:
    rows = list(csv.reader(open(path, encoding="utf-8", newline="")))[1:]
    for row in rows:
        value, measures, failure = row[1], row[2:-1], row[-1]
        if value == "1e+07":
            assert failure.startswith("short: the run failed"), row
            continue
        assert failure == "", row
        if value in by_value:
            assert by_value[value] == measures, (path, value, by_value[value], measures)
        by_value[value] = measures
assert sorted(by_value) == ["-50", "-52", "-54.387", "-57", "-60"], sorted(by_value)
PYEOF
done

# ---- batched agrees with scalar: the same spike counts, other measures to 1e-8 relative ----
for w in "${widths[@]}"; do
  "$PY" - "$TMP/w${w}t1.json" "$TMP/s1.json" <<'PYEOF' || fail "lanes $w: batched and scalar disagree"
import json, sys
batched, scalar = (json.load(open(p, encoding="utf-8")) for p in sys.argv[1:])
assert batched["engine"].startswith("batched") and scalar["engine"] == "scalar"
assert len(batched["points"]) == len(scalar["points"]) == 35
spiking = 0
for b, s in zip(batched["points"], scalar["points"]):
    assert b["parameters"] == s["parameters"] and b["failure"] is None and s["failure"] is None, (b, s)
    (bc, br, bp, bm), (sc, sr, sp, sm) = b["measures"], s["measures"]
    assert bc == sc, (b, s)
    spiking += sc >= 2
    assert (br is None) == (sr is None), (b, s)
    for x, y in ((br, sr), (bp, sp), (bm, sm)):
        if x is not None:
            assert abs(x - y) <= 1e-8 * abs(y), (b, s)
assert spiking >= 10, spiking  # the grid spans regimes, so the rates are really compared
PYEOF
done

# ---- scalar equals `saltpan run --set`: spike count from the run's summary, peak and mean from
# its trace (the trace's samples are the ones the measures read) ----
for point in 0 17 34; do
  read -r gna gk < <("$PY" -c "
import json, sys
p = json.load(open(sys.argv[1]))['points'][$point]['parameters']
print(repr(p[0]), repr(p[1]))" "$TMP/s1.json")
  expect_rc "run$point" 0 run --protocol short --set "axon.SquidSodium1952.density=$gna mS/cm2" \
    --set "axon.SquidPotassium1952.density=$gk mS/cm2" -o "$TMP/run$point.json" "$TMP/small.saltpan"
  "$PY" - "$TMP/s1.json" "$point" "$TMP/run$point.json" "$TMP/run$point.err" <<'PYEOF' || fail "run$point: saltpan run and the scalar sweep disagree"
import json, re, sys
point = json.load(open(sys.argv[1], encoding="utf-8"))["points"][int(sys.argv[2])]
run = json.load(open(sys.argv[3], encoding="utf-8"))
v = [c for c in run["columns"] if c["name"] == "axon.V"][0]["values"]
t = run["time_ms"]
count, rate, peak, mean = point["measures"]
summary = open(sys.argv[4], encoding="utf-8").read()
m = re.search(r"axon\.V: (\d+|no) spikes? above 0 mV", summary)
assert m, summary
assert count == (0 if m.group(1) == "no" else int(m.group(1))), (count, summary)
assert peak == max(v), (peak, max(v))
# The time-weighted mean of the trace by the trapezoid rule, computed here.
area = sum((t[i + 1] - t[i]) * (v[i] + v[i + 1]) / 2 for i in range(len(t) - 1))
assert abs(mean - area / (t[-1] - t[0])) <= 1e-9 * abs(mean), (mean, area / (t[-1] - t[0]))
PYEOF
done

finish
