// The version string written into result files and printed by `lobecast --version`.
#pragma once

#include <string_view>

namespace lobecast {

std::string_view SoftwareVersion();

}  // namespace lobecast
