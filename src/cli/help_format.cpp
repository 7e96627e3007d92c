// Help text wrapped to the terminal: the width comes from COLUMNS, else from
// the terminal on stdout (ioctl TIOCGWINSZ), else 100 columns (a pipe, a file,
// a test). Descriptions are written with line breaks for an 80-100 column
// reader; here those breaks inside a paragraph are undone and the text is
// wrapped again at the width. Lines that start with spaces (lists, tables,
// formulas, examples continued with a backslash) and lines starting "Example"
// are kept as written, so their columns line up and a copied example runs.
#include <sys/ioctl.h>
#include <unistd.h>

#include <algorithm>
#include <cstdlib>
#include <sstream>

#include "cli/cli_common.hpp"

namespace gapwise::cli {
namespace {

constexpr std::size_t kDefaultWidth = 100, kMinWidth = 60, kMaxWidth = 200, kOptionColumn = 30;

bool kept_as_is(const std::string& line) {
  return line.empty() || line[0] == ' ' || line.rfind("Example", 0) == 0 || line.back() == '\\';
}

/// `text` re-wrapped to `width` columns; continuation lines of an indented
/// line (a list item "  - ...") keep its indent.
std::string wrap(const std::string& text, std::size_t width) {
  std::vector<std::string> lines;
  std::istringstream in(text);
  bool continues_example = false;
  for (std::string line; std::getline(in, line);) {
    const bool keep = kept_as_is(line) || continues_example;
    continues_example = !line.empty() && line.back() == '\\';
    if (!keep && !lines.empty() && !kept_as_is(lines.back()) && !lines.back().empty()) lines.back() += " " + line;
    else lines.push_back(line);
  }
  std::string out;
  for (const std::string& line : lines) {
    if (!out.empty()) out += '\n';
    if (line.size() <= width || kept_as_is(line)) { out += line; continue; }
    const std::size_t text_at = line.find_first_not_of(' ');
    std::size_t indent = text_at == std::string::npos ? 0 : text_at;
    if (line.compare(indent, 2, "- ") == 0) indent += 2;  // a list item: continue under its text
    std::string current;
    std::istringstream words(line.substr(text_at == std::string::npos ? 0 : text_at));
    current = line.substr(0, text_at == std::string::npos ? 0 : text_at);
    bool first_word = true;
    for (std::string w; words >> w;) {
      if (!first_word && current.size() + 1 + w.size() > width) {
        out += current + '\n';
        current = std::string(indent, ' ') + w;
      } else {
        current += (first_word ? "" : " ") + w;
      }
      first_word = false;
    }
    out += current;
  }
  if (!text.empty() && text.back() == '\n') out += '\n';
  return out;
}

class WrappingFormatter : public CLI::Formatter {
 public:
  explicit WrappingFormatter(std::size_t width) : width_(width) { column_width(kOptionColumn); }
  std::string make_option_desc(const CLI::Option* opt) const override {
    return wrap(opt->get_description(), width_ - kOptionColumn);
  }
  std::string make_description(const CLI::App* app) const override {
    return wrap(CLI::Formatter::make_description(app), width_);
  }
  std::string make_subcommand(const CLI::App* sub) const override {
    std::stringstream out;
    CLI::detail::format_help(out, sub->get_display_name(true), wrap(sub->get_description(), width_ - kOptionColumn),
                             kOptionColumn);
    return out.str();
  }

 private:
  std::size_t width_;
};

}  // namespace

std::size_t help_width() {
  if (const char* c = std::getenv("COLUMNS")) {
    char* end = nullptr;
    const long v = std::strtol(c, &end, 10);
    if (end != c && *end == '\0' && v > 0)
      return std::clamp(static_cast<std::size_t>(v), kMinWidth, kMaxWidth);
  }
  winsize ws{};
  if (::isatty(STDOUT_FILENO) && ::ioctl(STDOUT_FILENO, TIOCGWINSZ, &ws) == 0 && ws.ws_col > 0)
    return std::clamp(static_cast<std::size_t>(ws.ws_col), kMinWidth, kMaxWidth);
  return kDefaultWidth;
}

void use_wrapped_help(CLI::App& app) { app.formatter(std::make_shared<WrappingFormatter>(help_width())); }

}  // namespace gapwise::cli
