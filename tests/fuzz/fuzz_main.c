/*
 * fuzz_main.c - the libFuzzer entry of one target, chosen when building:
 *   clang -fsanitize=fuzzer,address,undefined -DFUZZ_TARGET=fuzz_profile ...
 * (.ci/fuzz builds one binary per target; tests/fuzz/README.md).
 */
#include "fuzz_targets.h"

#ifndef FUZZ_TARGET
#error "define FUZZ_TARGET to one of the functions of fuzz_targets.h"
#endif

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    return FUZZ_TARGET(data, size);
}
