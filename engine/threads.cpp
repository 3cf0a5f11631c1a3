#include "engine/threads.h"

#include <omp.h>

namespace lobecast {

int ResolveThreads(int requested) { return requested > 0 ? requested : omp_get_max_threads(); }

}  // namespace lobecast
