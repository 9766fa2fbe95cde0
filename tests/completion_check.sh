#!/bin/bash
# completion_check.sh BINDIR SOURCE_ROOT - the bash completion offers what
# lampwick itself lists: commands, a command's options, modes of the profile
# on the line, profile keys after --set, cell names after --cells.  Prints
# "N passed, N failed".
set -u
PATH=$1:$PATH
cd "$2" || exit 1
# shellcheck source=/dev/null
source completion/lampwick.bash
compopt() { :; } # outside a completion, compopt refuses
pass=0
fail=0
# offers WANT WORDS...: completing the last word offers WANT (among others)
offers() {
    want=$1; shift
    COMP_WORDS=("$@")
    COMP_CWORD=$(($# - 1))
    COMPREPLY=()
    _lampwick
    if printf '%s\n' "${COMPREPLY[@]}" | grep -qx -- "$want"; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL: '$*' does not offer '$want': ${COMPREPLY[*]:0:12}"; fi
}
offers spread lampwick sp
offers table lampwick ''
offers --samples lampwick spread profiles/demo.ini --sam
offers --sampling lampwick spread profiles/demo.ini --sam
offers --target-ma lampwick pick profiles/demo.ini --target
offers low lampwick run profiles/demo.ini --mode ''
offers drive.resistor_ohm= lampwick run profiles/demo.ini --set drive.res
offers pack.capacity_pct= lampwick spread profiles/demo.ini --spread pack.cap
offers LR6-alkaline lampwick table profiles/demo.ini --cells LR6
offers csv lampwick run profiles/demo.ini --format c
offers sobol lampwick spread profiles/demo.ini --sampling s
offers cell lampwick fit c
offers --cutoff-v lampwick fit cell log.csv --cut
offers profiles/demo.ini lampwick run profiles/de
echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]
