#pragma once
// User-given text (labels, descriptions, instance names, file names) made safe
// to print on a terminal: control characters are shown as escapes instead of
// moving the cursor, clearing the screen or faking lines of output.
//
//   std::cout << terminal_text(problem.label(0));   // "a\x1b[2J" prints as a\x1b[2J
#include <string>
#include <string_view>

namespace gapwise {

/// `text` with every control character escaped: \n, \r, \t as such, other C0
/// bytes and DEL as \xHH, the C1 controls U+0080..U+009F (UTF-8 C2 80..C2 9F) as
/// \uHHHH. Printable UTF-8
/// passes unchanged. `keep_newlines` leaves '\n' alone (for multi-line messages).
std::string terminal_text(std::string_view text, bool keep_newlines = false);

}  // namespace gapwise
