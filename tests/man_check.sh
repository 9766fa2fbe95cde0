#!/bin/sh
# man_check.sh LAMPWICK MAN1 PROFILE5 CELL5 - the generated manual pages
# render without a warning (MANWIDTH=80 man --warnings -l), and carry every
# command and option `lampwick help` lists and every key `lampwick help
# keys` lists.  Prints "N passed, N failed"; exits 77 (skipped) without man.
set -u
LW=$1
shift
command -v man >/dev/null 2>&1 || { echo "man is not installed: skipped"; exit 77; }
T=$(mktemp -d /tmp/lampwick-man-XXXXXX)
trap 'rm -rf "$T"' EXIT
pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }
for page in "$@"; do
    name=$(basename "$page")
    MANWIDTH=80 man --warnings -l "$page" > "$T/$name.txt" 2> "$T/$name.err"
    if [ -s "$T/$name.err" ]; then bad "$name: $(head -3 "$T/$name.err")"; else ok; fi
    if [ "$(wc -l < "$T/$name.txt")" -gt 20 ]; then ok; else bad "$name: rendered short"; fi
done
m1=$T/lampwick.1.txt
# every command and each of its options
for cmd in run sweep pick size table spread "fit led" "fit cell" check cells; do
    if grep -q "^   $cmd\$" "$m1"; then ok; else bad "lampwick.1 lacks the command '$cmd'"; fi
    # shellcheck disable=SC2086
    for opt in $("$LW" help $cmd | sed -n 's/^  \(-h, \)\{0,1\}\(--[a-z-]*\).*/\2/p'); do
        if grep -E -q -- "^       (-h, )?$opt\b" "$m1"; then ok; else bad "lampwick.1 lacks $cmd $opt"; fi
    done
done
# every key of the profile and cell schemas
"$LW" help keys > "$T/keys.txt"
sect=profile
while IFS= read -r line; do
    case $line in
        "Cell file keys"*) sect=cell ;;
        "    "*)
            key=$(echo "$line" | awk '{print $1}')
            f=$T/lampwick-$sect.5.txt
            if grep -q "^       $key\b" "$f"; then ok; else bad "lampwick-$sect.5 lacks $key"; fi ;;
    esac
done < "$T/keys.txt"
echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]
