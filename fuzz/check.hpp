// What a fuzz target does when a property fails: say which, and abort, so that libFuzzer keeps the
// input as a crash artifact. Used like assert(), but never compiled out.
#pragma once

#include <cstdio>
#include <cstdlib>

#define FUZZ_CHECK(condition)                                                                           \
    do {                                                                                                \
        if (!(condition)) {                                                                             \
            std::fprintf(stderr, "fuzz property failed: %s (%s:%d)\n", #condition, __FILE__, __LINE__); \
            std::abort();                                                                               \
        }                                                                                               \
    } while (false)
