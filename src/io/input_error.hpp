#pragma once
// The one error type every parser and validator throws: it names the place
// (file, line, key) and says how to fix the problem. The command line maps it
// to exit code 2.
#include <stdexcept>
#include <string>

namespace gapwise {

/// Where in an input a problem sits. line/column are 1-based; 0 means unknown.
struct SourcePlace {
  std::string file;
  int line = 0;
  int column = 0;
  std::string key;  ///< dotted key path, e.g. "couplings[3]" or "path.points"
};

class InputError : public std::runtime_error {
 public:
  InputError(SourcePlace place, std::string problem, std::string fix = {});
  const SourcePlace& place() const { return place_; }
  const std::string& problem() const { return problem_; }
  const std::string& fix() const { return fix_; }

 private:
  SourcePlace place_;
  std::string problem_;
  std::string fix_;
};

/// "file:line:col: key 'k': problem. Fix: fix" with the parts that are known.
std::string format_input_error(const SourcePlace& place, const std::string& problem,
                               const std::string& fix);

}  // namespace gapwise
