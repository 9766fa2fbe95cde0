#!/bin/sh
# cli_test.sh LAMPWICK SOURCE_ROOT - end-to-end tests of the lampwick command:
# exit codes, file:line messages, output files, and regression of
# `lampwick run --format csv` on every bundled profile against tests/golden/
# (numbers compared to a relative 1e-6; the solve count within 10 %).
# Prints "N passed, N failed" and exits non-zero on any failure.
set -u
LW=$1
SRC=$2
TMP=$(mktemp -d /tmp/lampwick-cli-XXXXXX)
trap 'rm -rf "$TMP"' EXIT
pass=0
fail=0

ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

# expect CODE PATTERN CMD...: exit status CODE and stdout+stderr matching PATTERN
expect() {
    code=$1; pat=$2; shift 2
    out=$("$@" 2>&1); rc=$?
    if [ "$rc" -ne "$code" ]; then bad "$* -> exit $rc, want $code: $out"; return; fi
    if ! printf '%s\n' "$out" | grep -q -E -- "$pat"; then bad "$* -> output lacks /$pat/: $out"; return; fi
    ok
}

cd "$SRC" || exit 1

expect 0 '^lampwick [0-9]+\.[0-9]+\.[0-9]+$' "$LW" --version
expect 0 'Safety' "$LW" help
expect 0 'Usage: lampwick run' "$LW" help run
expect 0 'Lithium cells can overheat' "$LW" help run
expect 2 "unknown command 'frobnicate'" "$LW" frobnicate
expect 2 'Try .lampwick help run' "$LW" run
expect 2 '--format takes text, csv, md or json' "$LW" run profiles/demo.ini --format xml
expect 0 'demo.ini: ok' "$LW" check profiles/demo.ini
n=$("$LW" cells --format csv | tail -n +2 | wc -l)
if [ "$n" -ge 7 ]; then ok; else bad "cells lists $n cells"; fi
expect 0 'LR6-alkaline +alkaline' "$LW" cells

# every bundled profile checks
expect 0 ': ok' "$LW" check profiles/*.ini

# refusals: a misspelled key, a missing curve file, a non-monotonic curve
mkdir -p "$TMP/p"
cp "$SRC/cells/HR6-nimh.ini" "$TMP/p/mycell.ini"
cp "$SRC/cells/HR6-nimh.curve.csv" "$SRC/cells/nimh.temperature.csv" "$TMP/p/"
cat > "$TMP/p/light.ini" <<'INI'
[pack]
cell = mycell
series = 3
[led]
model = constant
forward_v = 2.9
flux_lm = 20
flux_current_ma = 50
[drive]
resistor_ohm = 22
INI
expect 0 ': ok' "$LW" check "$TMP/p/light.ini"
printf '[light]\nname = coin light\n[pack]\ncell = mycell\n[led]\nmodel = constant\nforward_v = 1.0\nflux_lm = 20\nflux_current_ma = 50\n[drive]\nresistor_ohm = 22\n' > "$TMP/p/coin.ini"
sed 's/resistor_ohm/resistr_ohm/' "$TMP/p/light.ini" > "$TMP/p/typo.ini"
expect 2 "typo.ini:10: unknown key 'resistr_ohm' in \[drive\]; did you mean 'drive.resistor_ohm'" "$LW" check "$TMP/p/typo.ini"
sed 's/^curve = .*/curve = gone.csv/' "$SRC/cells/HR6-nimh.ini" > "$TMP/p/mycell.ini"
expect 2 "mycell.ini:[0-9]+: \[cell\] curve: cannot open" "$LW" run "$TMP/p/light.ini"
cp "$SRC/cells/HR6-nimh.ini" "$TMP/p/mycell.ini"
awk 'NR == 5 { print "5,1.27,0.031"; next } { print }' "$SRC/cells/HR6-nimh.curve.csv" > "$TMP/p/HR6-nimh.curve.csv"
expect 2 "HR6-nimh.curve.csv:5: depth_pct = 5 does not increase" "$LW" run "$TMP/p/light.ini"
cp "$SRC/cells/HR6-nimh.curve.csv" "$TMP/p/"
expect 2 "^lampwick: --set led.forward_v: \[led\] forward_v = abc: expected a number" "$LW" run "$TMP/p/light.ini" --set led.forward_v=abc

# output files: written when the run succeeds, absent when it fails
expect 0 'runtime to cutoff' "$LW" run profiles/demo.ini --trace "$TMP/t.csv" --plot "$TMP/p.svg"
if head -1 "$TMP/t.csv" | grep -q '^time_h,depth_pct,pack_v'; then ok; else bad "trace header"; fi
rows=$(wc -l < "$TMP/t.csv")
if [ "$rows" -ge 200 ]; then ok; else bad "trace has $rows rows"; fi
if grep -q '</svg>' "$TMP/p.svg" && grep -q 'light output' "$TMP/p.svg"; then ok; else bad "svg"; fi
expect 2 'expected a number' "$LW" run profiles/demo.ini --set drive.resistor_ohm=x --trace "$TMP/none.csv" --plot "$TMP/none.svg"
if [ ! -e "$TMP/none.csv" ] && [ ! -e "$TMP/none.svg" ]; then ok; else bad "failed run left a file"; fi
if ls "$TMP" | grep -q tmp; then bad "temporary file left behind"; else ok; fi

# a step-down chain: switches reported, traced, marked, tabulated and drawn
expect 0 'turbo -> high \(after 180 s\)' "$LW" run profiles/torch-18650.ini --mode turbo --trace "$TMP/chain.csv" --plot "$TMP/chain.svg"
expect 0 'high -> low \(cell down to 3.2 V\)' "$LW" run profiles/torch-18650.ini --mode turbo
tr -d '\r' < "$TMP/chain.csv" > "$TMP/chain.txt" # RFC 4180 rows end in CRLF
if head -1 "$TMP/chain.txt" | grep -q ',t_j_c,t_board_c,t_body_c,session,mode$'; then ok; else bad "chain trace header"; fi
# the modes in order, and two rows at the instant of each switch
modes=$(tail -n +2 "$TMP/chain.txt" | awk -F, '$NF != last { printf "%s ", $NF; last = $NF }')
if [ "$modes" = "turbo high low " ]; then ok; else bad "chain trace modes: $modes"; fi
same=$(tail -n +2 "$TMP/chain.txt" | awk -F, 'NR > 1 && $1 == t && $NF != m { n++ } { t = $1; m = $NF } END { print n + 0 }')
if [ "$same" -eq 2 ]; then ok; else bad "rows at the switches: $same"; fi
if grep -q 'turbo to high' "$TMP/chain.svg" && grep -q 'high to low' "$TMP/chain.svg"; then ok; else bad "switch marks"; fi
expect 0 '^[0-9.]+,cell-voltage,.*,2,[0-9.]+,0,,,,[0-9]+,body-hot' "$LW" run profiles/torch-18650.ini --mode turbo --format csv
expect 0 'after 3 min [0-9]+ lm, at 3.2 V [0-9]+ lm' "$LW" table profiles/torch-18650.ini --plot "$TMP/modes.svg"
# use schedules: a periodic pattern, a sessions file with a mode column,
# the csv columns, the trace's sessions
expect 0 'sessions +[0-9]+, the run ending in the last' "$LW" run profiles/tail-light-coin.ini --mode evening
printf 'start_h,duration_h,mode\n0,2,\n24,3,commute\n48,1,\n' > "$TMP/sessions.csv"
expect 0 'Use \(3 planned sessions\)' "$LW" run profiles/tail-light-coin.ini --mode continuous --use "$TMP/sessions.csv"
expect 0 'sessions-done' "$LW" run profiles/tail-light-coin.ini --mode continuous --use "$TMP/sessions.csv" --format csv
expect 2 'refusing to write over it' "$LW" run profiles/tail-light-coin.ini --mode continuous --use "$TMP/sessions.csv" --trace "$TMP/sessions.csv"
expect 0 ',on_time_h,sessions,calendar_days,' "$LW" run profiles/tail-light-coin.ini --mode evening --format csv
expect 0 'Use: in sessions, 1 h on, 23 h off' "$LW" size profiles/tail-light-coin.ini --runtime-h 40 --use 1,23 --cells CR2032-lithium
expect 0 '^ +23 +5[0-9.]+ +5[0-9]' "$LW" sweep profiles/tail-light-coin.ini --use 1,0 --vary use.off_h=0,23 --columns runtime_h,sessions
"$LW" run profiles/tail-light-coin.ini --mode evening --trace "$TMP/use.csv" >/dev/null 2>&1
last=$(tr -d '\r' < "$TMP/use.csv" | tail -1 | awk -F, '{print $(NF-1)}')
if [ "$last" -ge 40 ] 2>/dev/null; then ok; else bad "trace sessions: $last"; fi
"$LW" run profiles/tail-light-coin.ini --mode evening --plot "$TMP/nights.svg" >/dev/null 2>&1
if grep -q 'output at switch-on' "$TMP/nights.svg" && [ "$(grep -c '<circle' "$TMP/nights.svg")" -ge 80 ]; then ok; else bad "night-by-night chart"; fi
if grep -q '</svg>' "$TMP/modes.svg" && grep -q '>turbo<' "$TMP/modes.svg" && grep -q '>low<' "$TMP/modes.svg"; then ok; else bad "chart of modes"; fi
for f in "$TMP/modes.svg" "$TMP/chain.svg"; do
    if python3 "$(dirname "$0")/svgcheck.py" "$f" >/dev/null 2>&1; then ok; else bad "svgcheck $f"; fi
done

# a light that never lights: exit 1, end_reason never-lit
expect 1 'never-lit' "$LW" run "$TMP/p/light.ini" --set pack.series=2 --format csv

# design workflows: sweep, pick, size, table
n=$("$LW" sweep profiles/demo.ini --vary drive.resistor_ohm=E24:10..1k --format csv --plot "$TMP/sweep.svg" | tail -n +2 | wc -l)
if [ "$n" -eq 49 ]; then ok; else bad "sweep E24:10..1k gave $n rows"; fi
if grep -q '</svg>' "$TMP/sweep.svg"; then ok; else bad "sweep plot"; fi
if python3 "$(dirname "$0")/svgcheck.py" "$TMP/sweep.svg" >/dev/null 2>&1; then ok; else bad "svgcheck sweep.svg: $(python3 "$(dirname "$0")/svgcheck.py" "$TMP/sweep.svg")"; fi
expect 0 '^drive.resistor_ohm,pack.cell,runtime_h,end_reason' "$LW" sweep profiles/demo.ini --vary drive.resistor_ohm=22,33 --vary pack.cell=LR6-alkaline,HR6-nimh --format csv
expect 2 "VALUES may be a list .*E24:10..1k" "$LW" sweep profiles/demo.ini --vary drive.resistor_ohm=10...
expect 2 "did you mean 'drive.resistor_ohm'" "$LW" sweep profiles/demo.ini --vary drive.resistr_ohm=1,2
expect 2 'give at least one --vary' "$LW" sweep profiles/demo.ini
expect 0 'chosen +36 ohm' "$LW" pick profiles/demo.ini --target-ma 50
expect 0 '^cell,resistor_ohm,eseries,tolerance_pct,ideal_ohm,nominal_led_ma' "$LW" pick profiles/demo.ini --target-ma 50 --format csv
expect 0 '^LR6-alkaline,36,E24,' "$LW" pick profiles/demo.ini --target-ma 50 --format csv
expect 0 'worst hot' "$LW" pick profiles/demo.ini --target-ma 50
expect 0 'cold \(-20 C\)' "$LW" pick profiles/demo.ini --target-ma 50
n=$("$LW" pick profiles/demo.ini --target-ma 50 --cells LR6-alkaline,HR6-nimh,FR6-lithium --format csv | tail -n +2 | wc -l)
if [ "$n" -eq 3 ]; then ok; else bad "pick --cells gave $n rows"; fi
expect 1 'nearest safe part' "$LW" pick profiles/demo.ini --target-ma 400
expect 2 'exactly one of --target-ma and --target-lm' "$LW" pick profiles/demo.ini
expect 0 '^cell +series +parallel +resistor_ohm' "$LW" size profiles/demo.ini --runtime-h 40 --flux-lm 15 --cells all
expect 1 'Nothing fits' "$LW" size profiles/demo.ini --runtime-h 100000 --cells LR6-alkaline
expect 0 '^\| mode \| LR6-alkaline lm \|' "$LW" table profiles/demo.ini --cells LR6-alkaline,FR6-lithium --format md
expect 0 'Rounding: ' "$LW" table profiles/demo.ini

# '-' reads a profile or a measurement CSV from standard input
expect 0 'runtime to cutoff +60\.39 h' sh -c "\"$LW\" run - < profiles/demo.ini"
expect 0 '^\(standard input\): ok' sh -c "\"$LW\" check - < profiles/demo.ini"
expect 2 '^lampwick: \(standard input\):2: \[led\] model = bulb: expected one of' sh -c "printf '[led]\\nmodel = bulb\\n' | \"$LW\" run -"
expect 0 '^8 measurements from 5 to 150 mA' sh -c "\"$LW\" fit led - < docs/examples/white-led-bench.csv"

# the user's own cells: $XDG_DATA_HOME/lampwick/cells
mkdir -p "$TMP/xdg/lampwick/cells"
sed 's/^name = .*/name = XDG-test-cell/' cells/LR6-alkaline.ini > "$TMP/xdg/lampwick/cells/XDG-test-cell.ini"
cp cells/LR6-alkaline.curve.csv cells/alkaline.temperature.csv "$TMP/xdg/lampwick/cells/"
expect 0 '^XDG-test-cell +alkaline' env XDG_DATA_HOME="$TMP/xdg" "$LW" cells
expect 0 'runtime to cutoff +60\.39 h' env XDG_DATA_HOME="$TMP/xdg" "$LW" run profiles/demo.ini --set pack.cell=XDG-test-cell
mkdir -p "$TMP/home/.local/share/lampwick"
cp -r "$TMP/xdg/lampwick/cells" "$TMP/home/.local/share/lampwick/"
expect 0 '^XDG-test-cell +alkaline' env -u XDG_DATA_HOME HOME="$TMP/home" "$LW" cells

# spread: the units shipped, from the profile's [spread] or --spread
expect 0 '^  spread PROFILE   the spread over the units shipped' "$LW" help
expect 0 'the nominal unit runs 249.9 h' "$LW" spread profiles/demo.ini --samples 200 --mode low --format md
expect 0 '^95 % of units run at least [0-9.]+ h \(95 % interval [0-9.]+ to [0-9.]+ h\)' "$LW" spread profiles/demo.ini --samples 400
expect 0 '^quantity,nominal,mean,sd,p1,p5,p50,p95,p99.?$' "$LW" spread profiles/demo.ini --samples 300 --format csv
expect 0 '^runtime_h,6[0-9.]+,' "$LW" spread profiles/demo.ini --samples 300 --format csv
expect 0 '^\| quantity \| nominal \| mean \|' "$LW" spread profiles/demo.ini --samples 300 --format md
expect 0 '^all of them +[0-9]+ +[0-9.]+ +[0-9.]+ +[0-9.]+$' "$LW" spread profiles/demo.ini --samples 300 --target 'runtime_h>=8' --target 'flux_30s_lm>=100'
expect 0 'What drives runtime_h: standardized rank regression' "$LW" spread profiles/headlamp-18650.ini --samples 300
expect 0 '^pack.capacity_pct +[0-9.]+ ' "$LW" spread profiles/demo.ini --samples 300 --spread pack.capacity_pct='normal 8'
expect 0 '^95 % of units run at least [0-9.]+ h \(Sobol points: no interval\)' "$LW" spread profiles/demo.ini --samples 256 --sampling sobol
expect 2 '--sampling takes random or sobol' "$LW" spread profiles/demo.ini --sampling halton
a1=$("$LW" spread profiles/demo.ini --samples 500 --seed 9 --threads 1 --format csv)
a2=$("$LW" spread profiles/demo.ini --samples 500 --seed 9 --threads 2 --format csv)
a3=$("$LW" spread profiles/demo.ini --samples 500 --seed 10 --threads 2 --format csv)
if [ "$a1" = "$a2" ] && [ "$a1" != "$a3" ]; then ok; else bad "spread: a seed is not the same on 1 and 2 threads, or two seeds agree"; fi
"$LW" spread profiles/demo.ini --samples 300 --histogram "$TMP/hist.svg" --ranking "$TMP/rank.svg" --samples-out "$TMP/units.csv" --target 'runtime_h>=58' >/dev/null 2>&1
for f in "$TMP/hist.svg" "$TMP/rank.svg"; do
    if python3 "$(dirname "$0")/svgcheck.py" "$f" >/dev/null 2>&1; then ok; else bad "svgcheck $f"; fi
done
if grep -q 'target runtime_h&gt;=58\|target runtime_h>=58' "$TMP/hist.svg" && grep -q '>p95 ' "$TMP/hist.svg"; then ok; else bad "histogram marks"; fi
if [ "$(tail -n +2 "$TMP/units.csv" | wc -l)" -eq 300 ] && head -1 "$TMP/units.csv" | grep -q '^sample,drive.resistor_ohm,pack.capacity_pct,pack.resistance_pct,led.saturation_a,runtime_h,'; then ok; else bad "spread --samples-out"; fi
cat > "$TMP/p/spread.ini" <<'INI'
[pack]
cell = LR6-alkaline
series = 3
[led]
model = constant
forward_v = 3.0
flux_lm = 20
flux_current_ma = 20
[drive]
resistor_ohm = 68
[spread]
drive.resistor_ohm = tolerance 5
pack.capacity_pct = gaussian 3
INI
expect 2 'spread.ini:13: \[spread\] pack.capacity_pct = gaussian 3: unknown distribution' "$LW" spread "$TMP/p/spread.ini"
expect 2 'spread.ini:13: \[spread\] pack.capacity_pct = gaussian 3' "$LW" check "$TMP/p/spread.ini"
printf '[pack]\ncell = LR6-alkaline\n[led]\nmodel = constant\nforward_v = 3\n[drive]\nresistor_ohm = 68\n[spread]\ndrive.resistr_ohm = tolerance 5\n' > "$TMP/p/spread2.ini"
expect 2 "spread2.ini:9: unknown key 'resistr_ohm' in \[drive\]; did you mean 'drive.resistor_ohm'" "$LW" run "$TMP/p/spread2.ini"
expect 2 "only keys that take any number may be spread" "$LW" spread profiles/demo.ini --spread pack.series='normal 1'
expect 2 'nothing to spread' "$LW" spread "$TMP/p/light.ini"
expect 2 '--samples takes a whole number from 2' "$LW" spread profiles/demo.ini --samples 1
expect 2 "write QUANTITY>=VALUE" "$LW" spread profiles/demo.ini --target 'hours>=8'
expect 2 'refusing to write over it' "$LW" spread profiles/demo.ini --samples 100 --histogram profiles/demo.ini

# a sweep chart never drops series silently, and past the palette's nine
# colours the series change marker
"$LW" sweep profiles/demo.ini --vary drive.resistor_ohm=22,33 --vary pack.ambient_c=-20..10:1 --plot "$TMP/many.svg" >/dev/null 2>&1
if grep -q 'the first 16 of 31 values of pack.ambient_c shown' "$TMP/many.svg" &&
    grep -q "width='7' height='7'" "$TMP/many.svg" &&
    grep -q "font-weight='bold'>ambient temperature (°C)<" "$TMP/many.svg" &&
    grep -q '^<title>Hut shelf lantern (demo)</title>' "$TMP/many.svg" && grep -q '^<desc>' "$TMP/many.svg" && python3 "$(dirname "$0")/svgcheck.py" "$TMP/many.svg" >/dev/null 2>&1; then ok; else bad "sweep chart of 31 series"; fi

# corners: an ambient range in run and table
expect 0 '^cold +-10 ' "$LW" run profiles/demo.ini --set pack.ambient_c=-10..40
expect 0 '^worst hot +40 ' "$LW" run profiles/demo.ini --set pack.ambient_c=-10..40
expect 0 '^medium +LR6-alkaline +60\.[0-9]+ +-10 ' "$LW" table profiles/demo.ini --set pack.ambient_c=-10..40
expect 0 '^\| mode \| cell \| runtime_h \| cold_c \|' "$LW" table profiles/demo.ini --format md
expect 2 'a range is written LOW..HIGH' "$LW" run profiles/demo.ini --set pack.ambient_c=40..-10

# fits from the bundled example measurements give files check accepts and run uses
EX="$SRC/docs/examples"
expect 0 'wrote .*fitted-nimh.ini' "$LW" fit cell "$EX/nimh-aa-3r9.csv" "$EX/nimh-aa-8r2.csv" --load-ohm 3.9,8.2 --cutoff-v 1.0 --chemistry nimh --rechargeable yes --out "$TMP/p/fitted-nimh.ini"
expect 0 'capacity_mah' "$LW" fit cell "$EX/nimh-aa-8r2.csv" --load-ohm 8.2 --cutoff-v 1.0 --resistance-ohm 0.035
# the kinetic model from the two capacities and the total; both models replay the logs
expect 0 'kinetic model: available_pct [0-9.]+, recovery_per_h [0-9.]+' "$LW" fit cell "$EX/nimh-aa-3r9.csv" "$EX/nimh-aa-8r2.csv" --load-ohm 3.9,8.2 --cutoff-v 1.0 --total-mah 2300 --out "$TMP/p/kin.ini"
if grep -q '^available_pct = ' "$TMP/p/kin.ini" && grep -q '^recovery_per_h = ' "$TMP/p/kin.ini"; then ok; else bad "kinetic keys in the fitted cell file"; fi
out=$("$LW" fit cell "$EX/nimh-aa-3r9.csv" "$EX/nimh-aa-8r2.csv" --load-ohm 3.9,8.2 --cutoff-v 1.0 --total-mah 2300 2>&1)
# the replayed runtimes within 1 % of the logs under both models (the fitted cell reproduces its logs)
bad_err=$(printf '%s\n' "$out" | grep -o '([+-][0-9.]* %)' | tr -d '()+% -' | awk '$1 > 1 { n++ } END { print n + 0 }')
if [ "$(printf '%s\n' "$out" | grep -c 'kinetic [0-9.]* (')" -eq 2 ] && [ "$bad_err" -eq 0 ]; then ok; else bad "fit cell replay: $out"; fi
expect 2 'total-mah takes' "$LW" fit cell "$EX/nimh-aa-3r9.csv" "$EX/nimh-aa-8r2.csv" --load-ohm 3.9,8.2 --cutoff-v 1.0 --total-mah -5
"$LW" fit led "$EX/white-led-bench.csv" --write-profile-section > "$TMP/p/led-section.ini" 2>&1
{ printf '[light]
name = fitted parts
[pack]
cell = fitted-nimh
series = 3
'
  cat "$TMP/p/led-section.ini"
  printf '[drive]
resistor_ohm = 22
'; } > "$TMP/p/fitted-light.ini"
expect 0 'fitted-light.ini: ok' "$LW" check "$TMP/p/fitted-light.ini"
expect 0 'runtime to cutoff' "$LW" run "$TMP/p/fitted-light.ini"
expect 0 '^model,threshold_v,slope_ohm,ideality,saturation_a,series_ohm,r_squared,rse_v' "$LW" fit led "$EX/white-led-bench.csv" --format csv
expect 0 'residual standard error' "$LW" fit led "$EX/white-led-bench.csv" --plot "$TMP/fit.svg"
if grep -q '</svg>' "$TMP/fit.svg"; then ok; else bad "fit plot"; fi
printf 'current_ma,forward_v
10,2.7
20,2.8
' > "$TMP/few.csv"
expect 2 'few.csv:3: 2 points are too few' "$LW" fit led "$TMP/few.csv"
printf 'current_ma,forward_v
10,2.7
0,2.6
20,2.8
40,2.9
' > "$TMP/zero.csv"
expect 2 'zero.csv:3: current_ma = 0' "$LW" fit led "$TMP/zero.csv"
printf 'current,forward_v
10,2.7
' > "$TMP/cols.csv"
expect 2 "cols.csv:1: missing column 'current_ma'" "$LW" fit led "$TMP/cols.csv"
awk 'NR == 6 { print "100,1.3"; next } { print }' "$EX/nimh-aa-8r2.csv" > "$TMP/back.csv"
expect 2 'back.csv:6: time_s = 100 does not increase' "$LW" fit cell "$TMP/back.csv" --load-ohm 8.2 --cutoff-v 1.0 --resistance-ohm 0.03
expect 2 'give the end-point voltage' "$LW" fit cell "$EX/nimh-aa-8r2.csv" --load-ohm 8.2

# regulated drives side by side, storage
expect 0 '^\| mode \| runtime_h \| end_reason .*\| regulated_h \|' "$LW" sweep profiles/lantern-drives.ini --vary mode=all --format md
expect 0 "At switch-on \(after 24 months' storage" "$LW" run profiles/lantern-drives.ini --stored-months 24
expect 2 "no \[mode turbo\]" "$LW" sweep profiles/lantern-drives.ini --vary mode=resistor,turbo
expect 0 'converter' "$LW" table profiles/lantern-drives.ini

# lights that give no light: an answer of their own, exit 1
expect 1 'empty-at-start' "$LW" run profiles/demo.ini --set pack.cell=CR2032-lithium
expect 1 'empty-at-start' "$LW" run profiles/demo.ini --set pack.stored_months=600 --set pack.cell=HR6-nimh
expect 1 'never-lit' "$LW" run profiles/demo.ini --set led.count=3
expect 1 'no light: the cells are empty' "$LW" run profiles/demo.ini --set pack.cell=CR2032-lithium
out=$("$LW" run profiles/demo.ini --set pack.cell=CR2032-lithium 2>/dev/null)
if printf '%s' "$out" | grep -q 'after 30 s'; then bad "a dark run reports output figures"; else ok; fi
expect 0 'no light .*empty-at-start' "$LW" table profiles/demo.ini --cells CR2032-lithium,LR6-alkaline
# a converter that cannot start: its fallback level, or never lit
expect 0 'LED current +5.00 mA' "$LW" run profiles/lantern-drives.ini --mode converter --set drive.min_input_v=4.8
expect 1 'never-lit' "$LW" run profiles/lantern-drives.ini --mode converter --set drive.min_input_v=4.8 --set drive.fallback_ma=0
# the table says what it computed
expect 0 "after 60 months' storage .*or to 20 lm" "$LW" table profiles/lantern-drives.ini --set pack.stored_months=60 --set cutoff.flux_lm=20
expect 0 'of the 30-s output of fresh cells at 20 C' "$LW" table profiles/demo.ini --set cutoff.reference=fresh
expect 0 'cutoff +10 % of the 30-s output of fresh cells at 20 C' "$LW" run profiles/demo.ini --set cutoff.reference=fresh --set pack.stored_months=60
# one number grammar: resistor codes in --set, --vary and files alike
expect 0 'runtime to cutoff' "$LW" run profiles/demo.ini --set drive.resistor_ohm=4k7
expect 0 '^4700,' "$LW" sweep profiles/demo.ini --vary drive.resistor_ohm=4k7 --format csv
# one message per usage error, naming the option
out=$("$LW" run profiles/demo.ini --bogus 2>&1)
if [ "$(printf '%s\n' "$out" | grep -c 'unknown option')" -eq 1 ] && printf '%s' "$out" | grep -q "'--bogus'"; then ok; else bad "usage error: $out"; fi
expect 0 '--cells LIST' "$LW" help table
expect 0 '--eseries E24' "$LW" help pick
expect 2 "unknown option '--series'" "$LW" pick profiles/demo.ini --target-ma 50 --series E24
# junction_c is the temperature of the LED data, not a heating knob
expect 0 'junction_c .*not a heating setting' "$LW" help keys
expect 0 '^junction_c = 25$' "$LW" fit led docs/examples/white-led-bench.csv --model linear --write-profile-section
expect 0 '^junction_c = 40$' "$LW" fit led docs/examples/white-led-bench.csv --junction-c 40 --write-profile-section
# plain numbers in the notes and charts
expect 0 'HR6-nimh: 1 cell \(1 in series' "$LW" table "$TMP/p/coin.ini"
"$LW" run profiles/demo.ini --set drive.resistor_ohm=2 --set pack.cell=INR18650-li-ion --plot "$TMP/short.svg" > "$TMP/short.txt" 2>&1
rt=$(sed -n 's/.*runtime to cutoff *\([0-9.]* [a-z]*\).*/\1/p' "$TMP/short.txt")
if [ -n "$rt" ] && grep -q "runtime to cutoff $rt" "$TMP/short.svg"; then ok; else bad "chart subtitle does not say '$rt'"; fi
# size and table CSV carry full precision
n=$("$LW" size profiles/demo.ini --runtime-h 40 --format csv | sed -n 2p | cut -d, -f7)
case "$n" in *.????????*) ok ;; *) bad "size csv runtime '$n' is rounded" ;; esac
# a regulated drive: size sizes the pack alone
expect 0 'The drive regulates' "$LW" size profiles/lantern-drives.ini --mode linear --runtime-h 10 --cells LR6-alkaline,HR6-nimh
# a profile kept beside the cells is skipped, with a note
mkdir -p "$TMP/lib"
cp "$SRC/cells/LR6-alkaline.ini" "$SRC/cells/LR6-alkaline.curve.csv" "$SRC/cells/alkaline.temperature.csv" "$TMP/lib/"
cp "$SRC/profiles/demo.ini" "$TMP/lib/"
expect 0 'not a cell file' env LAMPWICK_CELLS="$TMP/lib" "$LW" cells
expect 0 'LR6-alkaline' env LAMPWICK_CELLS="$TMP/lib" "$LW" sweep "$TMP/lib/demo.ini" --vary pack.cell=all --columns runtime_h

# ---- drives that once hung or failed: right answers, bounded work ----
# runtime_h of `run --format csv ARGS` (empty on failure; 60 s bound)
runtime() {
    timeout 60 "$LW" run "$@" --format csv 2>/dev/null | awk -F, '
        NR == 1 { for (i = 1; i <= NF; i++) if ($i == "runtime_h") c = i; next }
        NR == 2 && c { print $c }'
}
# near A B REL: |A - B| <= REL * |B|, both numbers
near() { awk -v a="$1" -v b="$2" -v r="$3" 'BEGIN {
    if (a == "" || b == "") exit 1; d = a - b; if (d < 0) d = -d; s = b < 0 ? -b : b
    exit !(d <= r * s) }'; }
within() { # DESC A B REL
    if near "$2" "$3" "$4"; then ok; else bad "$1: $2 vs $3 (relative $4)"; fi
}
L=profiles/lantern-drives.ini
# a lossless converter (efficiency 100 %, no quiescent draw) is the limit of
# lossy ones, not a hang: continuous in the efficiency (runtime ~ efficiency
# while the LED power is held, so 99.99 % gives 0.01 % less)
a=$(runtime $L --mode converter --set drive.efficiency_pct=100 --set drive.quiescent_ua=0)
b=$(runtime $L --mode converter --set drive.efficiency_pct=99.99 --set drive.quiescent_ua=0)
within "converter at 100 % against 99.99 %" "$b" "$a" 3e-4
# a linear regulator with no dropout is the limit of small dropouts
a=$(runtime $L --mode linear --set drive.dropout_v=0)
b=$(runtime $L --mode linear --set drive.dropout_v=1e-9)
c=$(runtime $L --mode linear --set drive.dropout_v=1e-4)
within "linear, dropout 0 against 1e-9 V" "$b" "$a" 1e-6
within "linear, dropout 0 against 0.1 mV" "$c" "$a" 1e-3
# a set current on a knot of the LED's tables lies between its neighbours
H=profiles/headlamp-18650.ini
a=$(runtime $H --set drive.type=converter --set drive.set_ma=99 --set drive.efficiency_pct=85)
b=$(runtime $H --set drive.type=converter --set drive.set_ma=100 --set drive.efficiency_pct=85)
c=$(runtime $H --set drive.type=converter --set drive.set_ma=101 --set drive.efficiency_pct=85)
if awk -v a="$a" -v b="$b" -v c="$c" 'BEGIN { exit !(b != "" && a > b && b > c) }'; then ok
else bad "set_ma 99, 100, 101: $a, $b, $c h are not in order"; fi
# lights below the visibility floor (LW_VISIBLE_LM, 1 mlm) never light
expect 1 'below the visibility floor of 0.001 lm' "$LW" run profiles/demo.ini --set led.count=1000
expect 1 'never-lit' timeout 60 "$LW" run profiles/demo.ini --set led.saturation_a=4e-153
expect 1 'never-lit' timeout 60 "$LW" run profiles/demo.ini --set led.model=table \
    --set led.iv_file=white-led-iv.csv --set drive.type=linear-cc --set drive.set_ma=1e-5 \
    --set drive.dropout_v=0.2
# special files are refused at once, not read forever
mkfifo "$TMP/fifo.ini"
expect 2 'fifo.ini: cannot open: not a regular file' timeout 10 "$LW" run "$TMP/fifo.ini"
expect 2 '/dev/zero: cannot open: not a regular file' timeout 10 "$LW" run /dev/zero
# one validation path, whichever way a value comes
expect 2 '^lampwick: --set cutoff.cell_v: .*not below the fresh open-circuit voltage' \
    "$LW" run profiles/demo.ini --set cutoff.cell_v=100
expect 2 "--vary pack.cell: \[pack\] cell: cell file '.*x.ini' not found" \
    "$LW" sweep profiles/demo.ini --vary pack.cell=../cells/x.ini
expect 0 'resistor, 0 ohm per string' "$LW" run profiles/demo.ini --set drive.resistor_ohm=-0 \
    --set led.count=1 --set pack.series=2
# every column may be asked for, more than once (once refused past 22)
cols=$(awk 'BEGIN { for (i = 0; i < 30; i++) printf "%sruntime_h", i ? "," : "" }')
n=$("$LW" sweep profiles/demo.ini --vary drive.resistor_ohm=22 --columns "$cols" --format csv | head -1 | awk -F, '{ print NF }')
[ "$n" = 31 ] && ok || bad "30 columns asked for, $n given"
# reading stops at the first unknown key, after 20,000 lines before it
awk 'BEGIN { print "[light]"; print "name = many"; for (i = 0; i < 20000; i++) print "; " i
             print "[mode a]"; for (i = 0; i < 20000; i++) print "drive.resistor_ohm" i " = 1" }' \
    > "$TMP/many.ini"
expect 2 'many.ini:20004: unknown key .resistor_ohm0. in \[drive\]' timeout 10 "$LW" run "$TMP/many.ini"
# and at the documented limits (docs/formats.md)
awk 'BEGIN { for (i = 0; i < 300; i++) { print "[mode m" i "]"; print "drive.resistor_ohm = " i + 1 } }' \
    > "$TMP/modes.ini"
expect 2 'modes.ini: more than 256 \[mode\] sections' timeout 10 "$LW" run "$TMP/modes.ini"
awk 'BEGIN { for (i = 0; i < 1100; i++) print "[mode m" i "]" }' > "$TMP/sections.ini"
expect 2 'sections.ini:1001: more than 1000 sections' timeout 10 "$LW" run "$TMP/sections.ini"
awk 'BEGIN { for (i = 0; i < 12000; i++) print "; a comment line of about a hundred characters, repeated until the file is over a megabyte" }' \
    > "$TMP/big.ini"
expect 2 'big.ini:[0-9]+: the file is larger than 1048576 bytes' timeout 10 "$LW" run "$TMP/big.ini"

# regression of run --format csv on every bundled profile and mode
compare() { # compare GOLDEN ACTUAL
    awk -F, -v g="$1" '
        NR == FNR { gold[FNR] = $0; next }
        {
            if (!(FNR in gold)) { print "extra line " FNR; bad = 1; next }
            n = split(gold[FNR], a, ","); m = split($0, b, ",")
            if (n != m) { print "field count " FNR; bad = 1; next }
            for (i = 1; i <= n; i++) {
                if (a[i] == b[i]) continue
                if (a[i] ~ /^-?[0-9.]+(e[-+]?[0-9]+)?$/ && b[i] ~ /^-?[0-9.]+(e[-+]?[0-9]+)?$/) {
                    d = a[i] - b[i]; if (d < 0) d = -d
                    s = a[i] < 0 ? -a[i] : a[i]
                    tol = (i == solves) ? 0.1 * s : 1e-6 * s + 1e-12
                    if (d <= tol) continue
                }
                print "line " FNR " field " i ": " a[i] " vs " b[i]; bad = 1
            }
        }
        FNR == 1 && NR != FNR { for (i = 1; i <= NF; i++) if ($i == "solves") solves = i }
        END { exit bad }' "$1" "$2"
}
# --format json: one document, a run of a light that never lit still answers
expect 0 '^\{"lampwick":"[0-9.]+","format":1,"command":"run"' "$LW" run profiles/demo.ini --format json
expect 1 '"end_reason":"empty-at-start"' "$LW" run profiles/demo.ini --set pack.cell=CR2032-lithium --format json
expect 0 '"command":"fit led"' "$LW" fit led docs/examples/white-led-bench.csv --format json
expect 2 'write-profile-section writes the \[led\] section as text' "$LW" fit led docs/examples/white-led-bench.csv --write-profile-section --format json
expect 2 '^lampwick: --set drive.resistor_ohm: .*expected a number' "$LW" run profiles/demo.ini --set drive.resistor_ohm=-1 --format json
# report: one HTML file, written whole, or nothing
expect 0 '' "$LW" report profiles/demo.ini -o "$TMP/review.html" --samples 100
if grep -q '^<!DOCTYPE html>' "$TMP/review.html" && tail -1 "$TMP/review.html" | grep -q '</html>'; then ok; else bad "report: not a whole HTML file"; fi
if SOURCE_DATE_EPOCH=0 "$LW" report profiles/demo.ini --samples 100 | grep -q '1970-01-01'; then ok; else bad "report: SOURCE_DATE_EPOCH not shown"; fi
expect 2 'Usage|name exactly one profile' "$LW" report
expect 2 'is a folder|not a regular file|folder' "$LW" report profiles/demo.ini -o "$TMP"
expect 1 'no light' "$LW" report profiles/demo.ini --set pack.cell=CR2032-lithium -o "$TMP/dark.html"
if [ ! -e "$TMP/dark.html" ]; then ok; else bad "report: a dark light left a file"; fi
expect 0 '^  -o, --output FILE.html' "$LW" report --help

# -q: no caution and no notes on standard output, the results unchanged
for c in "run profiles/demo.ini" "table profiles/demo.ini" "pick profiles/demo.ini --target-ma 30" \
         "spread profiles/demo.ini --samples 20" "sweep profiles/demo.ini --vary drive.resistor_ohm=22,33" \
         "size profiles/demo.ini --runtime-h 30" "cells"; do
    for f in text md; do
        # shellcheck disable=SC2086
        loud=$("$LW" $c --format $f 2>&1); quiet=$("$LW" $c --format $f -q 2>&1)
        if printf '%s' "$loud" | grep -q -E 'Caution|Typical values' &&
            ! printf '%s' "$quiet" | grep -q -E 'Caution|Typical values|^Test conditions|^\(a\)' &&
            [ "$(printf '%s\n' "$quiet" | grep -c -E '[0-9]')" -gt 0 ]; then ok; else
            bad "-q $c --format $f"; fi
    done
done
if "$LW" run profiles/demo.ini -q --format csv | cmp -s - "$SRC/tests/golden/demo.csv" ||
    [ "$("$LW" run profiles/demo.ini -q --format csv | head -1)" = "$(head -1 tests/golden/demo.csv)" ]; then ok; else bad "-q changed the CSV"; fi
# the review is a file: it always carries the caution, and takes no -q
expect 2 "unknown option '-q'" "$LW" report profiles/demo.ini -q

for prof in profiles/*.ini; do
    base=$(basename "$prof" .ini)
    modes=$(sed -n 's/^\[mode \(.*\)\]$/\1/p' "$prof")
    for mode in "" $modes; do
        name=$base${mode:+-$mode}
        "$LW" run "$prof" ${mode:+--mode "$mode"} --format csv > "$TMP/$name.csv" 2>/dev/null
        if [ -n "${LAMPWICK_BLESS:-}" ]; then cp "$TMP/$name.csv" "$SRC/tests/golden/$name.csv"; fi
        if [ ! -f "$SRC/tests/golden/$name.csv" ]; then bad "no golden file for $name"; continue; fi
        if msg=$(compare "$SRC/tests/golden/$name.csv" "$TMP/$name.csv"); then ok; else bad "golden $name: $msg"; fi
    done
done

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]
