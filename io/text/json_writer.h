// A small streaming JSON writer (RFC 8259) for the machine-readable reports:
// objects, arrays, strings, numbers that round-trip (io/text/number_text.h), booleans
// and null. JSON has no infinities or NaN, so every lobecast JSON output encodes them
// one way (README "JSON numbers"): +inf as the string "inf", -inf as the string
// "-inf", an undefined number (NaN) as null. Python's float() and C's strtod read
// both strings back as the infinities.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace lobecast {

class JsonWriter {
 public:
  // Pretty-printed with two-space indentation.
  JsonWriter() = default;

  void BeginObject();
  void EndObject();
  void BeginArray();
  void EndArray();
  // Inside an object: the next value's key.
  void Key(std::string_view key);
  void String(std::string_view value);
  void Number(double value);  // "inf", "-inf" for infinities, null for NaN
  void Int(long long value);
  void Bool(bool value);
  void Null();

  // Key and value in one call.
  void Member(std::string_view key, std::string_view value) { Key(key), String(value); }
  void Member(std::string_view key, const char* value) { Key(key), String(value); }
  void Member(std::string_view key, double value) { Key(key), Number(value); }
  void MemberInt(std::string_view key, long long value) { Key(key), Int(value); }
  void MemberBool(std::string_view key, bool value) { Key(key), Bool(value); }

  // The document so far, with a final newline once the top-level value is closed.
  const std::string& text() const { return out_; }

 private:
  void BeforeValue();
  void Newline();
  std::string out_;
  // Per open container: whether it already has an element.
  std::vector<bool> has_element_;
  bool after_key_ = false;
};

}  // namespace lobecast
