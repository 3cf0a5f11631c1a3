// Locale-independent text for numbers that must survive a round trip through a
// file (exports, JSON): the shortest decimal that parses back to the same double
// (std::to_chars), always with '.' as the decimal point, whatever the C locale.
#pragma once

#include <string>

namespace lobecast {

// "0.1", "1e-30", "-inf", "inf", "nan". std::strtod and Python's float() read all
// of them back exactly.
std::string ShortestText(double value);
void AppendShortest(std::string& out, double value);

}  // namespace lobecast
