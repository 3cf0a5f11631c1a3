// The thread count every parallel part of the engine uses.
#pragma once

namespace lobecast {

// `requested` > 0 is taken as given; 0 (or less) means the OpenMP default
// (OMP_NUM_THREADS, else the number of cores).
int ResolveThreads(int requested);

}  // namespace lobecast
