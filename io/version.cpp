#include "io/version.h"

namespace lobecast {

std::string_view SoftwareVersion() { return LOBECAST_VERSION; }

}  // namespace lobecast
