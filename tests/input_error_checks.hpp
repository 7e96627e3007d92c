#pragma once
// The checks every refusal test makes of an InputError: it is thrown, names the
// file, line and key, says the expected words and offers a fix.
//
//   check_input_error([&] { parse_schedule_text(text, "bad.toml"); }, "bad.toml", 4, "scales.b_max_ghz", "B(s)");
#include <doctest/doctest.h>

#include <string>

#include "io/input_error.hpp"

namespace gapwise::testing {

template <class F>
void check_input_error(F&& run, const std::string& file, int line, const std::string& key, const std::string& words) {
  try {
    run();
  } catch (const InputError& e) {
    INFO(e.what());
    CHECK(e.place().file == file);
    CHECK(e.place().line == line);
    CHECK(e.place().key == key);
    CHECK(std::string(e.what()).find(words) != std::string::npos);
    CHECK(!e.fix().empty());
    return;
  }
  FAIL("no InputError (expected " << file << ":" << line << " key '" << key << "')");
}

}  // namespace gapwise::testing
