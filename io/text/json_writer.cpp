#include "io/text/json_writer.h"

#include <cmath>
#include <cstdio>

#include "io/text/number_text.h"

namespace lobecast {

void JsonWriter::Newline() {
  out_ += '\n';
  out_.append(2 * has_element_.size(), ' ');
}

void JsonWriter::BeforeValue() {
  if (after_key_) {
    after_key_ = false;
    return;
  }
  if (!has_element_.empty()) {
    if (has_element_.back()) out_ += ',';
    has_element_.back() = true;
    Newline();
  }
}

void JsonWriter::BeginObject() {
  BeforeValue();
  out_ += '{';
  has_element_.push_back(false);
}

void JsonWriter::EndObject() {
  const bool any = has_element_.back();
  has_element_.pop_back();
  if (any) Newline();
  out_ += '}';
  if (has_element_.empty()) out_ += '\n';
}

void JsonWriter::BeginArray() {
  BeforeValue();
  out_ += '[';
  has_element_.push_back(false);
}

void JsonWriter::EndArray() {
  const bool any = has_element_.back();
  has_element_.pop_back();
  if (any) Newline();
  out_ += ']';
  if (has_element_.empty()) out_ += '\n';
}

void JsonWriter::Key(std::string_view key) {
  String(key);
  out_ += ": ";
  after_key_ = true;
}

void JsonWriter::String(std::string_view value) {
  BeforeValue();
  out_ += '"';
  for (const char ch : value) {
    const auto c = static_cast<unsigned char>(ch);
    switch (c) {
      case '"':
        out_ += "\\\"";
        break;
      case '\\':
        out_ += "\\\\";
        break;
      case '\n':
        out_ += "\\n";
        break;
      case '\t':
        out_ += "\\t";
        break;
      case '\r':
        out_ += "\\r";
        break;
      default:
        if (c < 0x20) {
          char buf[8];
          std::snprintf(buf, sizeof buf, "\\u%04x", c);
          out_ += buf;
        } else {
          out_ += ch;  // UTF-8 passes through
        }
    }
  }
  out_ += '"';
}

void JsonWriter::Number(double value) {
  if (std::isnan(value)) return Null();
  if (std::isinf(value)) return String(value > 0 ? "inf" : "-inf");
  BeforeValue();
  AppendShortest(out_, value);
}

void JsonWriter::Int(long long value) {
  BeforeValue();
  out_ += std::to_string(value);
}

void JsonWriter::Bool(bool value) {
  BeforeValue();
  out_ += value ? "true" : "false";
}

void JsonWriter::Null() {
  BeforeValue();
  out_ += "null";
}

}  // namespace lobecast
