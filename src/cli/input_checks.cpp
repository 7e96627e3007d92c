// The command line's check of its input-file arguments: the shared words of
// io/input_path (a link loop, a name too long, a missing file) instead of
// CLI11's "File does not exist" for all of them, as a gapwise error (exit 2).
#include "cli/cli_common.hpp"
#include "io/input_path.hpp"

namespace gapwise::cli {

CLI::Validator readable_input_file() {
  return CLI::Validator(
      [](std::string& path) {
        require_readable_input(path);  // throws InputError: main() prints it and exits with 2
        return std::string();
      },
      "FILE");
}

}  // namespace gapwise::cli
