#include "io/terminal_text.hpp"

#include <fmt/format.h>

namespace gapwise {

std::string terminal_text(std::string_view text, bool keep_newlines) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t k = 0; k < text.size(); ++k) {
    const auto c = static_cast<unsigned char>(text[k]);
    if (c == '\n' && keep_newlines) {
      out += '\n';
    } else if (c == '\n') {
      out += "\\n";
    } else if (c == '\r') {
      out += "\\r";
    } else if (c == '\t') {
      out += "\\t";
    } else if (c < 0x20 || c == 0x7f) {
      out += fmt::format("\\x{:02x}", c);
    } else if (c == 0xc2 && k + 1 < text.size() && static_cast<unsigned char>(text[k + 1]) >= 0x80 &&
               static_cast<unsigned char>(text[k + 1]) <= 0x9f) {
      out += fmt::format("\\u{:04x}", static_cast<unsigned char>(text[k + 1]));
      ++k;
    } else {
      out += static_cast<char>(c);
    }
  }
  return out;
}

}  // namespace gapwise
