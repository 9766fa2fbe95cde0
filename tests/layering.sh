#!/bin/sh
# layering.sh CC SOURCE_ROOT - the layers of liblampwick are enforced by the
# compiler: for every public header, its layer is the folder of its source
# file (src/base, src/model, src/io, src/study, src/report = layers 1 to 5),
# and a file compiled as layer L (-DLW_LAYER=L, as meson compiles each
# layer's library) must fail to include a header of a higher layer and must
# be able to include any header of its own layer or below.  A program
# outside the library (no LW_LAYER) may include every header, also in plain
# ISO C17 with no feature-test macro.
set -u
CC=$1
SRC=$(cd "$2" && pwd)
T=$(mktemp -d /tmp/lampwick-layers-XXXXXX)
trap 'rm -rf "$T"' EXIT
pass=0
fail=0
level() { case $1 in base) echo 1 ;; model) echo 2 ;; io) echo 3 ;; study) echo 4 ;; report) echo 5 ;; esac; }
try() { # LAYER HEADER -> 0 if it compiles
    printf '#include "lampwick/%s.h"\nint lw_layering_probe;\n' "$2" > "$T/probe.c"
    if [ "$1" = none ]; then def=""; else def="-DLW_LAYER=$1"; fi
    # shellcheck disable=SC2086
    "$CC" -std=c17 -D_POSIX_C_SOURCE=200809L $def -I"$SRC/include" -c "$T/probe.c" \
        -o "$T/probe.o" 2> "$T/err"
}
for h in "$SRC"/include/lampwick/*.h; do
    name=$(basename "$h" .h)
    [ "$name" = lampwick ] && continue
    c=$(ls "$SRC"/src/*/"$name".c 2>/dev/null | head -1)
    if [ -z "$c" ]; then fail=$((fail + 1)); echo "FAIL: $name.h has no source in a layer folder"; continue; fi
    hl=$(level "$(basename "$(dirname "$c")")")
    for l in 1 2 3 4 5; do
        if try $l "$name"; then got=ok; else got=refused; fi
        if [ $l -ge "$hl" ]; then want=ok; else want=refused; fi
        if [ $got = $want ]; then
            if [ $got = refused ] && ! grep -q 'header included from a lower layer' "$T/err"; then
                fail=$((fail + 1)); echo "FAIL: $name.h at layer $l refused for another reason: $(head -2 "$T/err")"
            else pass=$((pass + 1)); fi
        else
            fail=$((fail + 1)); echo "FAIL: $name.h (layer $hl) from layer $l: $got, want $want $(head -2 "$T/err")"
        fi
    done
done
if try none lampwick; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL: lampwick.h outside the library: $(head -3 "$T/err")"; fi
# a user's program in plain ISO C17, no feature-test macro: every public
# header must stand on its own (no POSIX-only type such as locale_t leaks)
for h in "$SRC"/include/lampwick/*.h; do
    name=$(basename "$h" .h)
    printf '#include <lampwick/%s.h>\nint lw_layering_probe;\n' "$name" > "$T/plain.c"
    if "$CC" -std=c17 -pedantic-errors -Wall -Wextra -Werror -I"$SRC/include" -c "$T/plain.c" \
        -o "$T/plain.o" 2> "$T/err"; then
        pass=$((pass + 1))
    else
        fail=$((fail + 1)); echo "FAIL: <lampwick/$name.h> in plain C17: $(head -3 "$T/err")"
    fi
done
echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]
