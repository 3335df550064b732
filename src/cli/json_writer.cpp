// benchtau: JSON writer.
#include "src/cli/json_writer.h"

#include <fmt/format.h>

#include <cmath>

namespace benchtau::cli {

std::string json_escape(std::string_view s) {
  std::string out;
  out.reserve(s.size() + 2);
  out += '"';
  for (char c : s) {
    switch (c) {
      case '"':
        out += "\\\"";
        break;
      case '\\':
        out += "\\\\";
        break;
      case '\n':
        out += "\\n";
        break;
      case '\r':
        out += "\\r";
        break;
      case '\t':
        out += "\\t";
        break;
      default:
        if (static_cast<unsigned char>(c) < 0x20) {
          out += fmt::format("\\u{:04x}", static_cast<unsigned>(static_cast<unsigned char>(c)));
        } else {
          out += c;
        }
    }
  }
  out += '"';
  return out;
}

void JsonWriter::before_value() {
  if (after_key_) {
    after_key_ = false;
    return;
  }
  if (stack_.empty()) return;
  Level& l = stack_.back();
  out_ += l.first ? "\n" : ",\n";
  l.first = false;
  out_.append(2 * stack_.size(), ' ');
}

void JsonWriter::open(char c) {
  before_value();
  out_ += c;
  stack_.push_back({true, c == '{'});
}

void JsonWriter::close(char c) {
  const bool empty = stack_.back().first;
  stack_.pop_back();
  if (!empty) {
    out_ += '\n';
    out_.append(2 * stack_.size(), ' ');
  }
  out_ += c;
  if (stack_.empty()) out_ += '\n';
}

JsonWriter& JsonWriter::begin_object() {
  open('{');
  return *this;
}
JsonWriter& JsonWriter::end_object() {
  close('}');
  return *this;
}
JsonWriter& JsonWriter::begin_array() {
  open('[');
  return *this;
}
JsonWriter& JsonWriter::end_array() {
  close(']');
  return *this;
}

JsonWriter& JsonWriter::key(std::string_view k) {
  before_value();
  out_ += json_escape(k);
  out_ += ": ";
  after_key_ = true;
  return *this;
}

JsonWriter& JsonWriter::value(double v) {
  before_value();
  out_ += std::isfinite(v) ? fmt::format("{}", v) : std::string("null");
  return *this;
}

JsonWriter& JsonWriter::value(std::size_t v) {
  before_value();
  out_ += fmt::format("{}", v);
  return *this;
}

JsonWriter& JsonWriter::value(bool v) {
  before_value();
  out_ += v ? "true" : "false";
  return *this;
}

JsonWriter& JsonWriter::value(std::string_view v) {
  before_value();
  out_ += json_escape(v);
  return *this;
}

JsonWriter& JsonWriter::null() {
  before_value();
  out_ += "null";
  return *this;
}

}  // namespace benchtau::cli
