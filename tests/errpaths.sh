#!/bin/sh
# errpaths.sh LAMPWICK SOURCE_ROOT - what happens when the world fails
# under a run: a full disk (/dev/full, a file-size limit, a small tmpfs when
# one can be mounted), a closed or broken standard output, and signals at
# random moments of every command that writes files (run --trace/--plot,
# sweep --plot, fit led --plot, fit cell --out).  Asserted each time: the
# exit status and message; every destination is at every moment either its
# old content or the whole new one (never partial); an interrupted run
# (SIGINT, SIGTERM, SIGHUP) leaves no temporary file; a cell file always
# names a curve that is there.  Prints what it did and "N passed, N failed".
set -u
case $1 in /*) LW=$1 ;; *) LW=$(pwd)/$1 ;; esac
SRC=$(cd "$2" && pwd)
ROUNDS=${LAMPWICK_KILL_ROUNDS:-25}
T=$(mktemp -d /tmp/lampwick-err-XXXXXX)
MNT=
trap '[ -n "$MNT" ] && umount "$MNT" 2>/dev/null; rm -rf "$T"' EXIT
export LAMPWICK_CELLS="$SRC/cells"
pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }
expect() { # DESC WANT_RC RC OUT REGEX
    if [ "$3" -ne "$2" ]; then bad "$1: exit $3, want $2: $4"
    elif ! printf '%s\n' "$4" | grep -q -E -- "$5"; then bad "$1: message lacks /$5/: $4"
    else ok; fi
}
no_temps() { # DIR DESC
    if ls "$1" | grep -q '\.tmp'; then bad "$2: temporary files left: $(ls "$1" | grep '\.tmp' | head -3)"
    else ok; fi
}

W=$T/w
mkdir -p "$W"
cp "$SRC/profiles/demo.ini" "$SRC/profiles/white-led-iv.csv" "$W/"
cd "$W" || exit 1
# a discharge log into 10 ohm for fit cell: invented values, only input
awk 'BEGIN { print "time_s,voltage_v"; for (i = 0; i <= 60; i++)
       printf "%d,%.4f\n", i * 600, 1.45 - 0.004 * i - (i > 50 ? 0.03 * (i - 50) : 0) }' > log.csv

# ---- standard output ----
out=$("$LW" run demo.ini 2>&1 >/dev/full); rc=$?
expect "run >/dev/full" 2 $rc "$out" "cannot write the output"
for cmd in "table demo.ini" "check demo.ini" "cells" "help run" "pick demo.ini --target-ma 20" \
           "size demo.ini --runtime-h 10 --cells LR6-alkaline" "fit led white-led-iv.csv" \
           "sweep demo.ini --vary drive.resistor_ohm=22,47"; do
    # shellcheck disable=SC2086
    out=$("$LW" $cmd 2>&1 >/dev/full); rc=$?
    expect "$cmd >/dev/full" 2 $rc "$out" "cannot write the output"
    # shellcheck disable=SC2086
    out=$("$LW" $cmd 2>&1 >&-); rc=$?
    expect "$cmd >&-" 2 $rc "$out" "standard output is closed"
done
# a reader that goes away: the status of a broken pipe (128 + 13), no message
for cmd in "sweep demo.ini --vary drive.resistor_ohm=E96:10..10k" "run demo.ini --format csv" \
           "cells"; do
    # shellcheck disable=SC2086
    rc=$( { "$LW" $cmd 2>"$T/pipe.err"; echo $? > "$T/pipe.rc"; } | head -c 20 >/dev/null; cat "$T/pipe.rc")
    # (a short report may be written whole before head closes: then 0)
    if [ "$rc" -ne 141 ] && [ "$rc" -ne 0 ]; then bad "$cmd | head: exit $rc"
    elif [ -s "$T/pipe.err" ]; then bad "$cmd | head: said $(cat "$T/pipe.err")"
    else ok; fi
done
rc=$( { "$LW" sweep demo.ini --vary drive.resistor_ohm=E192:10..100k 2>/dev/null; echo $? > "$T/pipe.rc"; } | head -c 1 >/dev/null; cat "$T/pipe.rc")
expect "long sweep | head -c 1" 141 "$rc" "" ""

# ---- a file-size limit (RLIMIT_FSIZE): the output fails, the old file stays ----
echo old > t.csv
out=$(ulimit -f 8; "$LW" run demo.ini --trace t.csv 2>&1 >/dev/null); rc=$?
expect "trace past ulimit -f" 2 $rc "$out" "t\\.csv.*(File too large|cannot write)"
[ "$(cat t.csv)" = old ] && ok || bad "trace past ulimit -f: the old t.csv changed"
no_temps . "trace past ulimit -f"
rm -f t.csv
out=$(ulimit -f 8; "$LW" run demo.ini --trace t.csv 2>&1 >/dev/null); rc=$?
expect "new trace past ulimit -f" 2 $rc "$out" "t\\.csv"
[ ! -e t.csv ] && ok || bad "new trace past ulimit -f: t.csv was left"

# ---- a small file system, full part way through ----
mkdir -p "$T/mnt"
if mount -t tmpfs -o size=24k tmpfs "$T/mnt" 2>/dev/null; then
    MNT=$T/mnt
    cp demo.ini log.csv "$MNT/"
    head -c 12000 /dev/zero > "$MNT/filler"
    echo old > "$MNT/t.csv"
    out=$(cd "$MNT" && "$LW" run demo.ini --trace t.csv 2>&1 >/dev/null); rc=$?
    expect "trace on a full disk" 2 $rc "$out" "t\\.csv.*(No space|cannot write)"
    [ "$(cat "$MNT/t.csv")" = old ] && ok || bad "trace on a full disk: the old t.csv changed"
    no_temps "$MNT" "trace on a full disk"
    out=$(cd "$MNT" && "$LW" fit cell log.csv --load-ohm 10 --cutoff-v 1.0 --resistance-ohm 0.1 \
          --out c.ini --name "full disk cell" 2>&1 >/dev/null); rc=$?
    # it may fit (exit 0) or not (exit 2): either way, a whole pair or none
    if [ $rc -eq 0 ] || { [ $rc -eq 2 ] && [ ! -e "$MNT/c.ini" ] && ! ls "$MNT" | grep -q curve-; }; then ok
    else bad "fit cell on a full disk: exit $rc, files: $(ls "$MNT" | tr '\n' ' ')"; fi
    no_temps "$MNT" "fit cell on a full disk"
    umount "$MNT"
    MNT=
else
    echo "note: no tmpfs could be mounted here; the file-size limit above stands for a full disk"
fi

# ---- signals at random moments: destinations old or whole, no temporaries ----
now_ns() { date +%s%N; }
# the reference outputs of an uninterrupted run of each command
prepare() { # NAME -> sets CMD OUTS
    case $1 in
    run) CMD="run demo.ini --trace t.csv --plot p.svg"; OUTS="t.csv p.svg" ;;
    sweep) CMD="sweep demo.ini --vary drive.resistor_ohm=E96:10..10k --plot s.svg"; OUTS="s.svg" ;;
    fitled) CMD="fit led white-led-iv.csv --plot f.svg"; OUTS="f.svg" ;;
    fitcell) CMD="fit cell log.csv --load-ohm 10 --cutoff-v 1.0 --resistance-ohm 0.1 --name bench --out bench.ini"
             OUTS="bench.ini" ;;
    esac
}
# the content of an output with the curve's unique name taken out
norm() { sed 's/\.curve-[0-9a-f]*\.csv/.curve-N.csv/' "$1"; }
# a cell file names a curve that is there
pair_ok() { # INI
    c=$(sed -n 's/^curve *= *//p' "$1")
    [ -n "$c" ] && [ -f "$(dirname "$1")/$c" ]
}

killed=0
caught=0
for name in run sweep fitled fitcell; do
    prepare $name
    # old destinations, then the reference new ones
    for o in $OUTS; do printf 'old %s\n' "$o" > "$o.old"; done
    t0=$(now_ns)
    # shellcheck disable=SC2086
    "$LW" $CMD >/dev/null 2>&1 || bad "$name: the uninterrupted run failed"
    t1=$(now_ns)
    span=$(( (t1 - t0) / 1000 )) # microseconds
    for o in $OUTS; do norm "$o" > "$o.new"; done
    [ $name = fitcell ] && { rm -f bench.curve-*.csv; }
    r=0
    while [ $r -lt "$ROUNDS" ]; do
        for sig in KILL TERM INT HUP STOP; do
            for o in $OUTS; do cp "$o.old" "$o"; done
            if [ $name = fitcell ]; then
                rm -f bench.curve-*.csv
                printf 'old curve\n' > bench.curve-00000000.csv
                printf '[cell]\nname = old\ncurve = bench.curve-00000000.csv\n' > bench.ini
                norm bench.ini > bench.ini.old
            fi
            # a moment between the start and 1.2 times the whole run
            d=$(awk -v s="$span" -v k="$killed" 'BEGIN { srand(k + 1); printf "%.6f", rand() * 1.2 * s / 1e6 }')
            # shellcheck disable=SC2086
            "$LW" $CMD >/dev/null 2>&1 &
            pid=$!
            sleep "$d"
            kill -s $sig $pid 2>/dev/null
            if [ $sig = STOP ]; then
                # frozen at that instant: every destination old or whole now
                ls | grep -q '\.tmp' && caught=$((caught + 1))
                for o in $OUTS; do
                    if ! { norm "$o" | cmp -s - "$o.old" || norm "$o" | cmp -s - "$o.new"; }; then
                        bad "$name, frozen after ${d}s: $o is neither old nor whole"
                    fi
                done
                kill -s KILL $pid 2>/dev/null
            fi
            wait $pid 2>/dev/null
            rc=$?
            killed=$((killed + 1))
            for o in $OUTS; do
                if norm "$o" | cmp -s - "$o.old" || norm "$o" | cmp -s - "$o.new"; then ok
                else bad "$name, SIG$sig after ${d}s (exit $rc): $o is neither old nor whole"; fi
            done
            [ $name = fitcell ] && { pair_ok bench.ini && ok || bad "$name, SIG$sig after ${d}s: bench.ini names a missing curve"; }
            case $sig in
            TERM | INT | HUP)
                if [ $rc -ne 0 ] && [ $rc -le 128 ]; then bad "$name, SIG$sig: exit $rc"; fi
                no_temps . "$name, SIG$sig after ${d}s" ;;
            *) rm -f ./*.tmp* ;; # SIGKILL cannot be caught: its temporaries may stay
            esac
        done
        r=$((r + 1))
    done
    for o in $OUTS; do rm -f "$o" "$o.old" "$o.new"; done
    rm -f bench.curve-*.csv
done
echo "signals: $killed runs interrupted at random moments, $caught frozen while a temporary file existed"
echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]
