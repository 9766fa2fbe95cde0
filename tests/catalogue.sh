#!/bin/sh
# catalogue.sh LAMPWICK - the bad-input catalogue: hundreds of refusals, each
# run in a fresh folder holding a known light profile, cell file and tables
# (so that the line numbers below stand in this file), each asserting the
# exit status, the file:line (or the option) and the key the message names,
# and that no file was created or changed.  Cases are table rows:
#
#   case STATUS 'REGEX' FILE LINE 'SED' [ARGS...]
#       edit FILE with the sed expression SED (or '' for none), run
#       `lampwick ARGS`, and expect STATUS and a message matching REGEX.
#   args STATUS 'REGEX' ARGS...
#       the same on the unedited files.
set -u
case $1 in /*) LW=$1 ;; *) LW=$(pwd)/$1 ;; esac
T=$(mktemp -d /tmp/lampwick-cat-XXXXXX)
trap 'rm -rf "$T"' EXIT
pass=0
fail=0

base() { # the known files, written afresh for every case
    rm -rf "$T/w"
    mkdir -p "$T/w"
    cat > "$T/w/p.ini" <<'EOF'
[light]
name = base light
[pack]
cell = cellA
series = 3
parallel = 1
ambient_c = 20
stored_months = 0
[led]
model = shockley
count = 1
strings = 2
ideality = 3.0
saturation_a = 4.6e-18
series_ohm = 1.5
junction_c = 25
flux_lm = 22
flux_current_ma = 60
flux_exponent = 0.9
max_current_ma = 150
forward_spread_pct = 5
[drive]
type = resistor
resistor_ohm = 33
tolerance_pct = 5
rating_w = 0.25
duty_pct = 100
standby_ua = 0
[cutoff]
relative_pct = 10
flux_lm = 0
[optics]
beam_angle_deg = 120
[mode low]
drive.resistor_ohm = 150
EOF
    cat > "$T/w/cellA.ini" <<'EOF'
[cell]
name = cellA
chemistry = alkaline
nominal_v = 1.5
capacity_mah = 2300
rated_ma = 100
peukert = 1.2
max_capacity_mah = 2800
cutoff_v = 0.9
rechargeable = no
mass_g = 23
self_discharge_pct_month = 0.2
curve = cellA.curve.csv
temperature = cellA.temp.csv
EOF
    sed 's/^flux_lm = 22$/flux_file = flux.csv/; /^flux_current_ma/d' "$T/w/p.ini" > "$T/w/pf.ini"
    printf 'depth_pct,open_circuit_v,resistance_ohm\n0,1.58,0.15\n50,1.26,0.21\n97,0.9,0.9\n100,0.8,1.8\n' > "$T/w/cellA.curve.csv"
    printf 'temp_c,capacity_factor,resistance_factor\n-20,0.3,4\n20,1,1\n50,1.05,0.9\n' > "$T/w/cellA.temp.csv"
    printf 'current_ma,forward_v\n1,2.5\n10,2.7\n50,2.9\n100,3.1\n' > "$T/w/iv.csv"
    printf 'current_ma,flux_lm\n10,5\n50,20\n100,35\n' > "$T/w/flux.csv"
    printf 'start_h,duration_h,mode\n0,2,\n24,1.5,low\n48,2,\n' > "$T/w/s.csv"
    printf 'input_v,efficiency_pct\n2,70\n3,85\n5,90\n' > "$T/w/eta.csv"
    printf 'time_s,voltage_v\n' > "$T/w/log.csv"
    i=0
    while [ $i -lt 20 ]; do
        printf '%d,%s\n' $((i * 60)) "$(awk -v k=$i 'BEGIN{printf "%.3f", 1.40 - 0.02 * k}')" >> "$T/w/log.csv"
        i=$((i + 1))
    done
    (cd "$T/w" && ls -l --time-style=+%s.%N; md5sum *) > "$T/before"
}

# LAMPWICK_CATALOGUE_CORPUS=DIR also writes each case as an input of the
# fuzzer's cli target there (tests/fuzz/fuzz_targets.h), for seeding.
ncase=0
as_corpus() { # ARGS...
    [ -n "${LAMPWICK_CATALOGUE_CORPUS:-}" ] || return 0
    ncase=$((ncase + 1))
    f="$LAMPWICK_CATALOGUE_CORPUS/catalogue-$ncase"
    printf 'lampwick %s\n' "$*" > "$f"
    for x in "$T"/w/*; do printf '=== %s\n' "$(basename "$x")" >> "$f"; cat "$x" >> "$f"; done
}

check() { # STATUS REGEX DESC ARGS...
    want=$1; pat=$2; desc=$3; shift 3
    as_corpus "$@"
    out=$(cd "$T/w" && LAMPWICK_CELLS=/nonexistent "$LW" "$@" 2>&1 </dev/null)
    rc=$?
    (cd "$T/w" && ls -l --time-style=+%s.%N; md5sum *) > "$T/after"
    if [ "$rc" -ne "$want" ]; then
        fail=$((fail + 1)); echo "FAIL [$desc] exit $rc, want $want: $out"; return
    fi
    if ! printf '%s\n' "$out" | grep -q -E -- "$pat"; then
        fail=$((fail + 1)); echo "FAIL [$desc] message lacks /$pat/: $out"; return
    fi
    if ! cmp -s "$T/before" "$T/after"; then
        fail=$((fail + 1)); echo "FAIL [$desc] files created or changed: $(diff "$T/before" "$T/after" | head -4)"; return
    fi
    pass=$((pass + 1))
}

case_() { # STATUS REGEX FILE LINE SED ARGS...
    want=$1; pat=$2; file=$3; line=$4; expr=$5; shift 5
    base
    if [ -n "$expr" ]; then
        sed -i "$expr" "$T/w/$file"
        (cd "$T/w" && ls -l --time-style=+%s.%N; md5sum *) > "$T/before"
    fi
    check "$want" "$pat" "$file:$line $expr" "$@"
}

args() { # STATUS REGEX ARGS...
    want=$1; pat=$2; shift 2
    base
    check "$want" "$pat" "$*" "$@"
}

RUN="run p.ini --trace t.csv --plot p.svg"

# ---- profile values: every key, through the file (its line) ----
# LINE KEY: numbers refused as not numbers or out of range
for v in abc 4.7x 1,2 nan inf 0x10 1e999 '' ' '; do
    for lk in "5 series" "6 parallel" "7 ambient_c" "8 stored_months" "11 count" "12 strings" \
              "13 ideality" "14 saturation_a" "15 series_ohm" "16 junction_c" "17 flux_lm" \
              "18 flux_current_ma" "19 flux_exponent" "20 max_current_ma" \
              "21 forward_spread_pct" "24 resistor_ohm" "25 tolerance_pct" "26 rating_w" \
              "27 duty_pct" "28 standby_ua" "30 relative_pct" "31 flux_lm" "33 beam_angle_deg"; do
        set -- $lk
        l=$1; k=$2
        [ "$v" = '' ] || [ "$v" = ' ' ] && [ "$k" != series ] && [ "$k" != ideality ] && continue
        case_ 2 "p.ini:$l: .*$k" p.ini "$l" "${l}s/=.*/= $v/" $RUN
    done
done
# out of range, per key
for lk in "5 series 0" "5 series 1001" "5 series 2.5" "6 parallel -1" "7 ambient_c -100" \
          "7 ambient_c 101" "8 stored_months -1" "8 stored_months 601" "11 count 0" \
          "12 strings 1001" "13 ideality 0" "13 ideality 51" "14 saturation_a 0" \
          "14 saturation_a 2" "15 series_ohm -1" "16 junction_c 251" "17 flux_lm 0" \
          "18 flux_current_ma 0" "19 flux_exponent 3.5" "20 max_current_ma 0" \
          "21 forward_spread_pct 50" "24 resistor_ohm -1" "25 tolerance_pct 50" \
          "26 rating_w 0" "27 duty_pct 0" "27 duty_pct 101" "28 standby_ua -1" \
          "30 relative_pct 0" "30 relative_pct 100" "31 flux_lm -1" "33 beam_angle_deg 0" \
          "33 beam_angle_deg 180"; do
    set -- $lk
    case_ 2 "p.ini:$1: .*$2 = $3: expected" p.ini "$1" "$1s/=.*/= $3/" $RUN
done
# choices and texts
case_ 2 "p.ini:10: .*model = bulb: expected one of constant, linear, shockley, table" p.ini 10 '10s/=.*/= bulb/' $RUN
case_ 2 "p.ini:23: .*type = boost: expected one of resistor, linear-cc, converter" p.ini 23 '23s/=.*/= boost/' $RUN
case_ 2 "p.ini:2: name: control character \\\\x01 in the value" p.ini 2 "2s/=.*/= a$(printf '\001')b/" $RUN
case_ 2 "p.ini:2: name: invalid UTF-8" p.ini 2 "2s/=.*/= a$(printf '\377')b/" $RUN
case_ 2 "p.ini:4: \\[pack\\] cell: no cell named 'nosuch'" p.ini 4 '4s/=.*/= nosuch/' $RUN
case_ 2 "p.ini:4: \\[pack\\] cell: .*not a cell file" p.ini 4 '4s/=.*/= p.ini/' $RUN
case_ 2 "p.ini:4: \\[pack\\] cell: cell file '.*gone.ini' not found" p.ini 4 '4s/=.*/= gone.ini/' $RUN
# syntax
case_ 2 "p.ini:25: unknown key 'tolerance' in \\[drive\\]; did you mean 'drive.tolerance_pct'" p.ini 25 '25s/tolerance_pct/tolerance/' $RUN
case_ 2 "p.ini:24: unknown key 'resistr_ohm' in \\[drive\\]; did you mean 'drive.resistor_ohm'" p.ini 24 '24s/resistor_ohm/resistr_ohm/' $RUN
case_ 2 "p.ini:22: unknown section \\[driver\\]; known sections" p.ini 22 '22s/drive/driver/' $RUN
case_ 2 "p.ini:25: \\[drive\\] resistor_ohm is given twice \\(first on line 24\\)" p.ini 25 '25s/.*/resistor_ohm = 22/' $RUN
case_ 2 "p.ini:25: \\[drive\\] .* given twice|p.ini:25: expected" p.ini 25 '25s/.*/  resistor_ohm = 22/' $RUN
case_ 2 "p.ini:1: key 'x' comes before any \\[section\\]" p.ini 1 '1s/.*/x = 1/' $RUN
case_ 2 "p.ini:3: expected '\\[section\\]' or 'key = value'" p.ini 3 '3s/.*/this is not ini/' $RUN
case_ 2 "p.ini:3: expected" p.ini 3 '3s/.*/[pack/' $RUN
case_ 2 "p.ini:2: line is too long" p.ini 2 "2s/=.*/= $(printf 'x%.0s' $(seq 1 220))/" $RUN
case_ 2 "p.ini:2: a NUL byte" p.ini 2 '2s/=.*/= a\x00b/' $RUN
case_ 2 "p.ini:2: name: control character \\\\x1B" p.ini 2 '2s/=.*/= a\x1b[31mb/' $RUN
case_ 2 "p.ini:3: section name too long" p.ini 3 "3s/.*/[$(printf 's%.0s' $(seq 1 70))]/" $RUN
case_ 2 "p.ini:2: section or key name too long" p.ini 2 "2s/.*/$(printf 'k%.0s' $(seq 1 70)) = 1/" $RUN
# needs of models and drives
case_ 2 "p.ini:10: \\[led\\] model needs the key 'forward_v'" p.ini 10 '10s/=.*/= constant/' $RUN
case_ 2 "p.ini:10: \\[led\\] model needs the key 'threshold_v'" p.ini 10 '10s/=.*/= linear/' $RUN
case_ 2 "p.ini:10: \\[led\\] model needs the key 'iv_file'" p.ini 10 '10s/=.*/= table/' $RUN
case_ 2 "p.ini:13: .*needs the key 'ideality'|p.ini:10: \\[led\\] model needs the key 'ideality'" p.ini 13 '13d' $RUN
case_ 2 "\\[led\\] give either flux_file or flux_lm" p.ini 17 '17s/.*/flux_file = flux.csv\nflux_lm = 22/' $RUN
case_ 2 "p.ini:9: \\[led\\] needs the light output" p.ini 17 '17,18d' $RUN
case_ 2 "p.ini:23: \\[drive\\] type needs the key 'set_ma'" p.ini 23 '23s/=.*/= linear-cc/' $RUN
case_ 2 "p.ini:23: \\[drive\\] type = converter needs exactly one of efficiency_pct" p.ini 23 '23s/=.*/= converter\nset_ma = 50/' $RUN
case_ 2 "p.ini:23: \\[drive\\] type needs the key 'resistor_ohm'" p.ini 24 '24d' $RUN
case_ 2 "fallback_ma must be below set_ma" p.ini 23 '23s/=.*/= converter\nset_ma = 50\nefficiency_pct = 85\nfallback_ma = 60/' $RUN
case_ 2 "p.ini:3: \\[pack\\] is missing the key 'cell'" p.ini 4 '4d' $RUN
case_ 2 "\\[optics\\] give beam_angle_deg or peak_cd_per_lm, not both" p.ini 33 '33s/.*/beam_angle_deg = 120\npeak_cd_per_lm = 2/' $RUN
case_ 2 "cell_v = 2 is not below the fresh open-circuit voltage" p.ini 31 '31s/.*/flux_lm = 0\ncell_v = 2/' $RUN
# [thermal]: required keys at the section's line, and values
case_ 2 "p.ini:34: \\[thermal\\] is missing the key 'junction_board_k_w'" p.ini 33 '33s/$/\n[thermal]\nbody_ambient_k_w = 20/' $RUN
case_ 2 "p.ini:37: \\[thermal\\] losses_in_body = maybe: expected yes or no" p.ini 33 '33s/$/\n[thermal]\njunction_board_k_w = 8\nbody_ambient_k_w = 20\nlosses_in_body = maybe/' $RUN
case_ 2 "p.ini:37: \\[thermal\\] body_j_k = -5: expected a number >= 0" p.ini 33 '33s/$/\n[thermal]\njunction_board_k_w = 8\nbody_ambient_k_w = 20\nbody_j_k = -5/' $RUN
case_ 2 "p.ini:35: .*body_ambient_k_w = 0: expected a number > 0" p.ini 33 '33s/$/\n[thermal]\nbody_ambient_k_w = 0\njunction_board_k_w = 8/' $RUN
case_ 2 "p.ini:38: \\[thermal\\] foldback needs .* 'foldback_to_c' is missing" p.ini 33 '33s/$/\n[thermal]\njunction_board_k_w = 8\nbody_ambient_k_w = 20\nbody_j_k = 50\nfoldback_from_c = 40\nfoldback_min_pct = 50/' $RUN
case_ 2 "p.ini:39: \\[thermal\\] foldback_to_c = 30 must be above foldback_from_c = 40" p.ini 33 '33s/$/\n[thermal]\njunction_board_k_w = 8\nbody_ambient_k_w = 20\nbody_j_k = 50\nfoldback_from_c = 40\nfoldback_to_c = 30\nfoldback_min_pct = 50/' $RUN
# step-down chains: the keys of a [mode NAME] (p.ini ends with [mode low] on 34-35)
case_ 2 "p.ini:36: \\[mode low\\] next = off needs a trigger" p.ini 35 '35s/$/\nnext = off/' $RUN
case_ 2 "p.ini:36: \\[mode low\\] next_after_s needs next" p.ini 35 '35s/$/\nnext_after_s = 60/' $RUN
case_ 2 "p.ini:36: \\[mode low\\] next = high: no such mode" p.ini 35 '35s/$/\nnext = high\nnext_after_s = 60/' $RUN
case_ 2 "p.ini:36: \\[mode low\\] next = low: .*a cycle" p.ini 35 '35s/$/\nnext = low\nnext_after_s = 60/' $RUN
case_ 2 "p.ini:40: \\[mode mid\\] next = low: the chain from \\[mode low\\] .*a cycle" p.ini 35 '35s/$/\nnext = mid\nnext_after_s = 60\n[mode mid]\ndrive.resistor_ohm = 68\nnext = low\nnext_below_cell_v = 1.1/' $RUN
case_ 2 "p.ini:37: \\[mode low\\] next_after_s = '-5': expected a number above 0" p.ini 35 '35s/$/\nnext = off\nnext_after_s = -5/' $RUN
case_ 2 "p.ini:37: \\[mode low\\] next_below_cell_v = '20': expected a number above 0 to 10" p.ini 35 '35s/$/\nnext = off\nnext_below_cell_v = 20/' $RUN
case_ 2 "p.ini:37: \\[mode low\\] next_above_c needs a \\[thermal\\] section" p.ini 35 '35s/$/\nnext = off\nnext_above_c = 45/' $RUN
case_ 2 "p.ini:38: \\[mode mid\\] changes the pack of a chain" p.ini 35 '35s/$/\nnext = mid\nnext_after_s = 60\n[mode mid]\npack.series = 2/' run p.ini --mode low
case_ 2 "p.ini:36: \\[mode low\\] next: name a mode or off" p.ini 35 '35s/$/\nnext =/' $RUN
# modes
case_ 2 "p.ini:35: unknown key 'resistr_ohm' in \\[drive\\]" p.ini 35 '35s/resistor_ohm/resistr_ohm/' $RUN
case_ 2 "p.ini:35: .*expected section.key" p.ini 35 '35s/drive.resistor_ohm/resistor_ohm/' $RUN
case_ 2 "p.ini:35: .*resistor_ohm = x: expected a number" p.ini 35 '35s/=.*/= x/' $RUN
case_ 2 "p.ini:36: \\[mode low\\] appears twice \\(first on line 34\\)" p.ini 35 '35s/$/\n[mode low]\ndrive.resistor_ohm = 47/' $RUN
case_ 2 "p.ini:34: a mode section needs a name" p.ini 34 '34s/.*/[mode]/' $RUN
args 2 "no \\[mode turbo\\]; the modes are: low" run p.ini --mode turbo

# ---- the same values through --set: the option is named ----
for kv in pack.series=0 pack.series=x pack.ambient_c=500 led.ideality=0 led.saturation_a=nan \
          led.flux_lm=-1 led.max_current_ma=abc drive.resistor_ohm=-5 drive.tolerance_pct=80 \
          drive.rating_w=0 drive.duty_pct=0 drive.type=boost led.model=bulb \
          cutoff.relative_pct=100 cutoff.flux_lm=x cutoff.cell_v=5 cutoff.reference=always \
          optics.beam_angle_deg=200 pack.stored_months=1e9 drive.standby_ua=-1 \
          led.tc_forward_mv_k=-90 led.heat_pct=120 thermal.junction_board_k_w=0 \
          thermal.losses_in_body=2; do
    k=${kv%%=*}
    args 2 "^lampwick: --set $k: " $RUN --set "$kv"
done
args 2 "unknown key 'resistr_ohm' in \\[drive\\]; did you mean 'drive.resistor_ohm'" $RUN --set drive.resistr_ohm=1
args 2 "unknown section \\[drve\\]" $RUN --set drve.resistor_ohm=1
args 2 "expected section.key=value" $RUN --set justtext
args 2 "expected section.key" $RUN --set .x=1
args 2 "\\[pack\\] cell: no cell named 'nosuch'" $RUN --set pack.cell=nosuch
args 2 "control character" $RUN --set "light.name=a$(printf '\033')b"

# ---- the cell file ----
for lk in "4 nominal_v" "5 capacity_mah" "6 rated_ma" "7 peukert" "8 max_capacity_mah" \
          "9 cutoff_v" "11 mass_g" "12 self_discharge_pct_month"; do
    set -- $lk
    for v in abc -1 1e999; do
        case_ 2 "cellA.ini:$1: .*$2" cellA.ini "$1" "$1s/=.*/= $v/" $RUN
    done
done
case_ 2 "cellA.ini:7: .*peukert = 3: expected" cellA.ini 7 '7s/=.*/= 3/' $RUN
case_ 2 "cellA.ini:3: .*chemistry = plutonium: expected one of" cellA.ini 3 '3s/=.*/= plutonium/' $RUN
case_ 2 "cellA.ini:10: .*rechargeable = maybe: expected yes or no" cellA.ini 10 '10s/=.*/= maybe/' $RUN
case_ 2 "cellA.ini:8: max_capacity_mah \\(2000\\) is below capacity_mah" cellA.ini 8 '8s/=.*/= 2000/' $RUN
case_ 2 "cellA.ini:9: cutoff_v = 2 is not below the fresh open-circuit voltage" cellA.ini 9 '9s/=.*/= 2/' $RUN
case_ 2 "cellA.ini:1: \\[cell\\] is missing the key 'nominal_v'" cellA.ini 4 '4d' $RUN
case_ 2 "cellA.ini:1: \\[cell\\] is missing the key 'curve'" cellA.ini 13 '13d' $RUN
case_ 2 "cellA.ini:13: \\[cell\\] curve: cannot open '.*nothere.csv'" cellA.ini 13 '13s/=.*/= nothere.csv/' $RUN
case_ 2 "cellA.ini:14: \\[cell\\] temperature: cannot open '.*nothere.csv'" cellA.ini 14 '14s/=.*/= nothere.csv/' $RUN
case_ 2 "cellA.ini:13: \\[cell\\] curve: cannot open .*: it is a folder" cellA.ini 13 '13s/=.*/= ./' $RUN
case_ 2 "cellA.ini:13: \\[cell\\] curve: cannot open .*not a regular file" cellA.ini 13 '13s|=.*|= /dev/zero|' $RUN
case_ 2 "cellA.ini:2: unknown key 'nam' in \\[cell\\]" cellA.ini 2 '2s/name/nam/' $RUN
case_ 2 "p.ini:4: \\[pack\\] cell: .*cellA.ini' is not a cell file \\(it has no \\[cell\\] section\\)" cellA.ini 1 '1s/cell/cel/' $RUN
case_ 2 "cellA.ini:3: \\[cell\\] name is given twice" cellA.ini 2 '2s/$/\nname = again/' $RUN
# the kinetic model: its keys, and the model without them
case_ 2 "cellA.ini:15: rate_model = kinetic needs 'available_pct'" cellA.ini 14 '14s/$/\nrate_model = kinetic/' $RUN
case_ 2 "cellA.ini:15: rate_model = kinetic needs 'recovery_per_h'" cellA.ini 14 '14s/$/\nrate_model = kinetic\navailable_pct = 60/' $RUN
case_ 2 "cellA.ini:15: .*rate_model = two-well: expected one of" cellA.ini 14 '14s/$/\nrate_model = two-well/' $RUN
for v in 0 100 -5 abc; do
    case_ 2 "cellA.ini:15: .*available_pct" cellA.ini 14 "14s/\$/\\navailable_pct = $v/" $RUN
done
for v in 0 -1 1e9; do
    case_ 2 "cellA.ini:15: .*recovery_per_h" cellA.ini 14 "14s/\$/\\nrecovery_per_h = $v/" $RUN
done
args 2 "--set pack.rate_model: \\[pack\\] rate_model = kinetic: the cell cellA has no kinetic parameters" $RUN --set pack.rate_model=kinetic
# use schedules: [use], --use and sessions files (s.csv: a header and three rows)
args 2 "--set use.off_h: \\[use\\] off_h needs on_h" $RUN --set use.off_h=5
args 2 "\\[use\\] give either sessions_file or on_h" $RUN --set use.on_h=1 --set use.sessions_file=s.csv
for v in 0 -1 abc 1e9; do
    args 2 "use.on_h" $RUN --set use.on_h=$v
done
args 2 "use.off_h" $RUN --set use.on_h=1 --set use.off_h=-2
args 2 "--use takes ON_H,OFF_H" $RUN --use 1,x
args 2 "--use takes ON_H,OFF_H" $RUN --use 0,5
args 2 "\\[use\\] sessions_file: cannot open '.*nothere.csv'" $RUN --use nothere.csv
case_ 2 "s.csv:3: column 'mode': the profile has no \\[mode high\\]" s.csv 3 '3s/low/high/' $RUN --use s.csv
case_ 2 "s.csv:3: column 'start_h': the session starts at 1 h, before the one above it ends at 2 h" s.csv 3 '3s/^24/1/' $RUN --use s.csv
case_ 2 "s.csv:4: column 'duration_h': 0 is not above 0" s.csv 4 '4s/,2,$/,0,/' $RUN --use s.csv
case_ 2 "s.csv:2: column 'start_h': -3 is outside" s.csv 2 '2s/^0/-3/' $RUN --use s.csv
case_ 2 "s.csv:2: column 'start_h': 'x' is not a number" s.csv 2 '2s/^0/x/' $RUN --use s.csv
case_ 2 "s.csv:1: .*duration_h" s.csv 1 '1s/duration_h/length_h/' $RUN --use s.csv
case_ 2 "s.csv:3: column 'mode': the field holds a control character" s.csv 3 "3s/low/lo\x01w/" $RUN --use s.csv
# the weakest cell's keys
for v in 100 -1 abc; do
    args 2 "capacity_spread_pct" $RUN --set pack.capacity_spread_pct=$v
done
for v in -1 2000; do
    args 2 "resistance_spread_pct" $RUN --set pack.resistance_spread_pct=$v
done

# ---- CSV tables: the curve, the temperature table, LED and driver tables ----
C=cellA.curve.csv
case_ 2 "$C:4: depth_pct = 40 does not increase" $C 4 '3s/.*/40,1.3,0.2/;4s/.*/40,1.2,0.3/' $RUN
case_ 2 "$C:2: depth_pct must start at 0" $C 2 '2s/^0,/5,/' $RUN
case_ 2 "$C:5: depth_pct must end at 100" $C 5 '5s/^100,/99,/' $RUN
case_ 2 "$C:3: open_circuit_v = 1.7 rises with depth" $C 3 '3s/1.26/1.7/' $RUN
case_ 2 "$C:3: resistance_ohm = 0: expected a positive" $C 3 '3s/0.21$/0/' $RUN
case_ 2 "$C:3: open_circuit_v = -1: expected a positive" $C 3 '3s/1.26/-1/' $RUN
case_ 2 "$C:3: depth_pct = 150 is above 100" $C 3 '3s/^50,/150,/' $RUN
case_ 2 "$C:3: row has 2 fields but the header has 3" $C 3 '3s/,0.21$//' $RUN
case_ 2 "$C:3: row has 4 fields" $C 3 '3s/$/,9/' $RUN
case_ 2 "$C:3: column 'open_circuit_v': 'x' is not a number" $C 3 '3s/1.26/x/' $RUN
case_ 2 "$C:3: column 'open_circuit_v': 'nan' is not a number" $C 3 '3s/1.26/nan/' $RUN
case_ 2 "$C:3: column 'open_circuit_v': the field is longer than 127" $C 3 "3s/1.26/1.26$(printf ' %.0s' $(seq 1 130))x/" $RUN
case_ 2 "$C:3: a NUL byte" $C 3 '3s/1.26/1.26\x00junk/' $RUN
case_ 2 "$C:1: missing column 'depth_pct'" $C 1 '1s/depth_pct/depth/' $RUN
case_ 2 "$C:1: unknown column 'extra'" $C 1 '1s/$/,extra/;2,$s/$/,1/' $RUN
case_ 2 "$C:1: column 'depth_pct' appears twice" $C 1 '1s/resistance_ohm/depth_pct/' $RUN
case_ 2 "$C:1: the header is one field with semicolons" $C 1 's/,/;/g' $RUN
case_ 2 "$C:1: the file is empty" $C 1 '1,$d' $RUN
case_ 2 "$C:1: no data rows after the header" $C 1 '2,$d' $RUN
case_ 2 "$C:[0-9]+: CSV syntax" $C 3 '3s/1.26/"1.26/' $RUN
case_ 2 "$C:1: column 2 of the header has no name" $C 1 '1s/open_circuit_v//' $RUN
case_ 2 "$C:1: column 1 of the header is longer than 63" $C 1 "1s/depth_pct/$(printf 'd%.0s' $(seq 1 70))/" $RUN
TT=cellA.temp.csv
case_ 2 "$TT:3: temp_c = -30 does not increase" $TT 3 '3s/^20,/-30,/' $RUN
case_ 2 "$TT:3: capacity_factor = 3: expected > 0 and <= 2" $TT 3 '3s/,1,1$/,3,1/' $RUN
case_ 2 "$TT:3: resistance_factor = 0: expected > 0 and <= 100" $TT 3 '3s/,1,1$/,1,0/' $RUN
case_ 2 "$TT:2: temp_c = -90: expected -80 to 150" $TT 2 '2s/^-20,/-90,/' $RUN
case_ 2 "$TT:1: missing column 'temp_c'" $TT 1 '1s/temp_c/t/' $RUN
case_ 2 "$TT:2: a temperature table needs at least 2 rows" $TT 2 '3,$d' $RUN
TAB="p.ini 10 10s/=.*/=\ table\niv_file\ =\ iv.csv/"
case_ 2 "iv.csv:3: current_ma = 0.5 does not increase" iv.csv 3 '3s/^10,/0.5,/;1a\' run p.ini --set led.model=table --set led.iv_file=iv.csv
case_ 2 "iv.csv:3: forward_v = 2 falls on the previous row" iv.csv 3 '3s/2.7/2/' run p.ini --set led.model=table --set led.iv_file=iv.csv
case_ 2 "iv.csv:2: forward_v = 0: expected > 0" iv.csv 2 '2s/2.5/0/' run p.ini --set led.model=table --set led.iv_file=iv.csv
case_ 2 "iv.csv:2: current_ma = -1: expected >= 0" iv.csv 2 '2s/^1,/-1,/' run p.ini --set led.model=table --set led.iv_file=iv.csv
case_ 2 "iv.csv:1: missing column 'forward_v'" iv.csv 1 '1s/forward_v/volts/' run p.ini --set led.model=table --set led.iv_file=iv.csv
case_ 2 "iv.csv:2: at least 2 rows are needed" iv.csv 2 '3,$d' run p.ini --set led.model=table --set led.iv_file=iv.csv
case_ 2 "p.ini:0?.*\\[led\\] iv_file: cannot open|--set led.iv_file: \\[led\\] iv_file: cannot open" iv.csv 1 '' run p.ini --set led.model=table --set led.iv_file=none.csv
case_ 2 "flux.csv:3: current_ma = 5 does not increase" flux.csv 3 '3s/^50,/5,/' run pf.ini
case_ 2 "flux.csv:2: flux_lm = -5: expected >= 0" flux.csv 2 '2s/,5$/,-5/' run pf.ini
case_ 2 "eta.csv:3: efficiency_pct = 0: expected > 0" eta.csv 3 '3s/,85$/,0/' run p.ini --set drive.type=converter --set drive.set_ma=50 --set drive.efficiency_file=eta.csv
case_ 2 "efficiency_file: efficiency above 100" eta.csv 3 '3s/,85$/,120/' run p.ini --set drive.type=converter --set drive.set_ma=50 --set drive.efficiency_file=eta.csv
case_ 2 "eta.csv:3: input_v = 1 does not increase" eta.csv 3 '3s/^3,/1,/' run p.ini --set drive.type=converter --set drive.set_ma=50 --set drive.efficiency_file=eta.csv

# ---- discharge logs (fit cell) ----
LOGFIT="fit cell log.csv --load-ohm 3.9 --cutoff-v 1.1 --resistance-ohm 0.03"
case_ 2 "log.csv:5: time_s = 60 does not increase" log.csv 5 '5s/^180,/60,/' $LOGFIT
case_ 2 "log.csv:5: voltage_v = -1: expected a positive" log.csv 5 '5s/,[0-9.]*$/,-1/' $LOGFIT
case_ 2 "log.csv:1: missing column 'voltage_v'" log.csv 1 '1s/voltage_v/v/' $LOGFIT
case_ 2 "log.csv:6: 5 samples are too few" log.csv 6 '7,$d' $LOGFIT
case_ 2 "log.csv:5: gap in the log" log.csv 5 '5,$s/^\([0-9]*\),/9000\1,/' $LOGFIT
case_ 2 "the log never reaches the end point 0.2 V" log.csv 1 '' fit cell log.csv --load-ohm 3.9 --cutoff-v 0.2 --resistance-ohm 0.03
case_ 2 "no current_ma column: give the load" log.csv 1 '' fit cell log.csv --cutoff-v 1.1 --resistance-ohm 0.03
args 2 "with one log the internal resistance cannot be separated" fit cell log.csv --load-ohm 3.9 --cutoff-v 1.1
args 2 "cannot open" fit cell nolog.csv --load-ohm 3.9 --cutoff-v 1.1 --resistance-ohm 0.03
args 2 "cannot open: it is a folder" fit led .
args 2 "flux.csv:1: missing column 'forward_v'" fit led flux.csv
args 2 "--name is too long" fit cell log.csv --load-ohm 3.9 --cutoff-v 1.1 --resistance-ohm 0.03 --name "$(printf 'n%.0s' $(seq 1 80))"
args 2 "the cell name holds a control character|cell name" fit cell log.csv --load-ohm 3.9 --cutoff-v 1.1 --resistance-ohm 0.03 --name "$(printf 'a\nb')" --out out.ini
args 2 "the cell name holds one of ; # \\[ \\] =" fit cell log.csv --load-ohm 3.9 --cutoff-v 1.1 --resistance-ohm 0.03 --name "AA ; batch 7" --out out.ini

# ---- command lines: every command's options ----
args 2 "unknown command 'frobnicate'" frobnicate
args 2 "Try 'lampwick help run'" run
args 2 "name exactly one profile" run p.ini p.ini
args 2 "unknown option '--bogus'" run p.ini --bogus
args 2 "unknown option '-x'" run p.ini -x
args 2 "option '--set' needs an argument" run p.ini --set
args 2 "--format takes text, csv, md or json" run p.ini --format xml
args 2 "--stored-months takes 0 to 600" run p.ini --stored-months -3
args 2 "--stored-months takes 0 to 600" run p.ini --stored-months lots
args 2 "give at least one --vary" sweep p.ini
args 2 "VALUES may be a list" sweep p.ini --vary drive.resistor_ohm=10...
args 2 "VALUES may be a list" sweep p.ini --vary drive.resistor_ohm=
args 2 "VALUES may be a list" sweep p.ini --vary drive.resistor_ohm=5..1
args 2 "VALUES may be a list" sweep p.ini --vary drive.resistor_ohm=E24:1k..10
args 2 "VALUES may be a list" sweep p.ini --vary drive.resistor_ohm=1..4:0
args 2 "VALUES may be a list" sweep p.ini --vary drive.resistor_ohm=22,,33
args 2 "VALUES may be a list" sweep p.ini --vary drive.resistor_ohm=22,abc
args 2 "VALUES may be a list" sweep p.ini --vary led.model=bulb
args 2 "--vary: 'mode=nosuch': the profile has no \\[mode nosuch\\]" sweep p.ini --vary mode=nosuch
args 2 "did you mean 'drive.resistor_ohm'" sweep p.ini --vary drive.resistr_ohm=1,2
args 2 "unknown column 'runtime'" sweep p.ini --vary drive.resistor_ohm=22 --columns runtime
args 2 "more than 64 columns" sweep p.ini --vary drive.resistor_ohm=22 --columns "$(printf 'runtime_h,%.0s' $(seq 1 70))runtime_h"
args 2 "--threads takes a whole number from 1 to 64" sweep p.ini --vary drive.resistor_ohm=22 --threads 0
args 2 "--threads takes a whole number" sweep p.ini --vary drive.resistor_ohm=22 --threads many
args 2 "too many --vary options" sweep p.ini --vary a.b=1 --vary a.b=1 --vary a.b=1 --vary a.b=1 --vary a.b=1 --vary a.b=1 --vary a.b=1 --vary a.b=1 --vary a.b=1
# spread: [spread] forms with their file:line, and the options
SP='$a [spread]'
case_ 2 "p.ini:37: \\[spread\\] drive.resistor_ohm = gaussian 5: unknown distribution" p.ini 37 "$SP\ndrive.resistor_ohm = gaussian 5" spread p.ini
case_ 2 "p.ini:37: \\[spread\\] drive.resistor_ohm = normal: give one number" p.ini 37 "$SP\ndrive.resistor_ohm = normal" spread p.ini
case_ 2 "p.ini:37: \\[spread\\] drive.resistor_ohm = normal -3: give one number" p.ini 37 "$SP\ndrive.resistor_ohm = normal -3" spread p.ini
case_ 2 "p.ini:37: \\[spread\\] drive.resistor_ohm = uniform 40..30: give LOW..HIGH" p.ini 37 "$SP\ndrive.resistor_ohm = uniform 40..30" spread p.ini
case_ 2 "p.ini:37: \\[spread\\] drive.resistor_ohm = tolerance 100: a tolerance is under 100" p.ini 37 "$SP\ndrive.resistor_ohm = tolerance 100" spread p.ini
case_ 2 "p.ini:37: \\[spread\\] drive.resistor_ohm = bin 22,-1: a bin is outside the key's range" p.ini 37 "$SP\ndrive.resistor_ohm = bin 22,-1" spread p.ini
case_ 2 "p.ini:37: \\[spread\\] drive.resistor_ohm = bin 22:0,33: bins are numbers" p.ini 37 "$SP\ndrive.resistor_ohm = bin 22:0,33" spread p.ini
case_ 2 "p.ini:37: \\[spread\\] pack.ambient_c = uniform 200..300: no value of it lies in the key's range" p.ini 37 "$SP\npack.ambient_c = uniform 200..300" spread p.ini
case_ 2 "p.ini:37: .*only keys that take any number may be spread" p.ini 37 "$SP\npack.series = normal 1" spread p.ini
case_ 2 "p.ini:37: unknown key 'resistr_ohm' in \\[drive\\]; did you mean 'drive.resistor_ohm'" p.ini 37 "$SP\ndrive.resistr_ohm = normal 1" run p.ini
case_ 2 "p.ini:37: \\[spread\\] 'resistor': expected section.key" p.ini 37 "$SP\nresistor = normal 1" check p.ini
case_ 2 "p.ini:38: \\[spread\\] drive.resistor_ohm is given twice" p.ini 38 "$SP\ndrive.resistor_ohm = normal 1\ndrive.resistor_ohm = normal 2" spread p.ini
args 2 "nothing to spread" spread p.ini
args 2 "--samples takes a whole number from 2" spread p.ini --spread drive.resistor_ohm=tolerance --samples 0
args 2 "--samples takes a whole number from 2" spread p.ini --samples 1e5
args 2 "--seed takes a whole number" spread p.ini --seed -1
args 2 "--target: 'runtime_h=8': write QUANTITY>=VALUE" spread p.ini --target runtime_h=8
args 2 "--quantity: 'hours' is not one of" spread p.ini --quantity hours
args 2 "--spread: 'drive.resistor_ohm': write --spread SECTION.KEY=FORM" spread p.ini --spread drive.resistor_ohm
args 2 "--spread: \\[spread\\] drive.resistor_ohm = tolerance: give one number" spread p.ini --spread drive.resistor_ohm=tolerance
args 2 "a range is written LOW..HIGH" run p.ini --set pack.ambient_c=30..10
case_ 2 "p.ini:7: .*ambient_c = -80: expected a number >= -60" p.ini 7 '7s/=.*/= -80..40/' run p.ini
args 2 "give exactly one of --target-ma and --target-lm" pick p.ini
args 2 "give exactly one of --target-ma and --target-lm" pick p.ini --target-ma 20 --target-lm 5
args 2 "the target must be a positive number" pick p.ini --target-ma -5
args 2 "--eseries takes E3, E6" pick p.ini --target-ma 20 --eseries E25
args 2 "unknown option '--series'" pick p.ini --target-ma 20 --series E24
args 2 "give the required runtime with --runtime-h" size p.ini
args 2 "--runtime-h takes a positive number" size p.ini --runtime-h 0
args 2 "--flux-lm takes a positive number" size p.ini --runtime-h 5 --flux-lm x
args 2 "--max-series and --max-parallel take 1 to 24" size p.ini --runtime-h 5 --max-series 30
args 2 "--top takes a positive whole number" size p.ini --runtime-h 5 --top 0
args 2 "no cell named 'nosuch'" size p.ini --runtime-h 5 --cells nosuch
args 2 "name exactly one profile" table
args 2 "no cell named" table p.ini --cells cellA,nosuch
args 2 "--model takes linear, shockley or both" fit led iv.csv --model cubic
args 2 "--junction-c takes a temperature" fit led iv.csv --junction-c 300
args 2 "give the end-point voltage with --cutoff-v" fit cell log.csv --load-ohm 3.9
args 2 "give one --load-ohm or --load-ma" fit cell log.csv --load-ohm 3.9,x --cutoff-v 1
args 2 "--chemistry takes alkaline" fit cell log.csv --load-ohm 3.9 --cutoff-v 1 --chemistry unobtainium
args 2 "--rechargeable takes yes or no" fit cell log.csv --load-ohm 3.9 --cutoff-v 1 --rechargeable perhaps
args 2 "--tolerance-mv takes 0 to 500" fit cell log.csv --load-ohm 3.9 --cutoff-v 1 --tolerance-mv 900
args 2 "say what to fit" fit
args 2 "no command 'nothing'" help nothing
args 2 "name at least one profile" check
args 2 "takes no arguments" cells extra

# ---- input and output files ----
args 2 "p.ini: cannot open|cannot open: No such file" run nosuch.ini
args 2 "cannot open: it is a folder" run .
args 2 "cannot open: not a regular file" run /dev/null
args 2 "--trace: 'p.ini' is the same file as 'p.ini'" run p.ini --trace p.ini
args 2 "--plot: 'cellA.curve.csv' is the same file as" run p.ini --plot cellA.curve.csv
args 2 "--plot: 'same.svg' is the same file as 'same.svg'" run p.ini --trace same.svg --plot same.svg
# a device or pipe as a destination: a private one, never the system's
# (a lampwick that wrongly replaced it would, as root, replace /dev/null)
if mknod "$T/node" c 1 3 2>/dev/null; then kind=c; else mkfifo "$T/node"; kind=p; fi
args 2 "cannot write: not a regular file" run p.ini --trace "$T/node"
if [ -$kind "$T/node" ]; then pass=$((pass + 1)); else
    fail=$((fail + 1)); echo "FAIL [--trace DEVICE] the device was replaced"; fi
mkfifo "$T/pipe"
args 2 "cannot write: not a regular file" run p.ini --plot "$T/pipe"
if [ -p "$T/pipe" ]; then pass=$((pass + 1)); else
    fail=$((fail + 1)); echo "FAIL [--plot FIFO] the pipe was replaced"; fi
args 2 "is longer than 511 bytes" run p.ini --trace "$(printf 'x%.0s' $(seq 1 600)).csv"
args 2 "--out: 'log.csv' is the same file" fit cell log.csv --load-ohm 3.9 --cutoff-v 1.1 --resistance-ohm 0.03 --out log.csv
args 2 "a cell file name must end in .ini" fit cell log.csv --load-ohm 3.9 --cutoff-v 1.1 --resistance-ohm 0.03 --out out.txt
args 2 "--plot: 'iv.csv' is the same file" fit led iv.csv --plot iv.csv

# ---- no answer (exit 1): valid input that gives no light or no part ----
args 1 "no light: the LEDs never light" run p.ini --set led.count=3
case_ 1 "empty" cellA.ini 12 '12s/=.*/= 30/' run p.ini --set pack.stored_months=120

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ] && [ "$pass" -ge 200 ]
