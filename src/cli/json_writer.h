// benchtau: a small streaming JSON writer for the reports.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace benchtau::cli {

// Writes indented JSON into a string. Numbers print in the shortest form that
// reads back to the same double; NaN and infinities, which JSON lacks, print
// as null. Keys and values must alternate inside objects; misuse is a bug in
// the caller and is not checked beyond what keeps the output well formed.
class JsonWriter {
 public:
  JsonWriter& begin_object();
  JsonWriter& end_object();
  JsonWriter& begin_array();
  JsonWriter& end_array();
  JsonWriter& key(std::string_view k);
  JsonWriter& value(double v);
  JsonWriter& value(std::size_t v);
  JsonWriter& value(bool v);
  JsonWriter& value(std::string_view v);
  JsonWriter& value(const char* v) { return value(std::string_view(v)); }
  JsonWriter& null();

  // The document so far, with a final newline once the outermost value is closed.
  const std::string& str() const { return out_; }

 private:
  void before_value();
  void open(char c);
  void close(char c);

  std::string out_;
  struct Level {
    bool first = true;
    bool is_object = false;
  };
  std::vector<Level> stack_;
  bool after_key_ = false;
};

std::string json_escape(std::string_view s);

}  // namespace benchtau::cli
