// LOBECAST_KERNEL_CLONES marks a hot kernel to be compiled for AVX-512, AVX2+FMA
// and the baseline; the loader picks one for the running CPU (GCC/Clang function
// multiversioning), so a portable build is still fast. A -march=native build makes
// "default" native too. Elsewhere it expands to nothing.
#pragma once

#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
#define LOBECAST_KERNEL_CLONES \
  __attribute__((target_clones("arch=x86-64-v4", "arch=x86-64-v3", "default")))
#else
#define LOBECAST_KERNEL_CLONES
#endif
