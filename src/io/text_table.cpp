#include "io/text_table.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "io/terminal_text.hpp"

namespace gapwise {

std::string TextTable::render() const {
  // Cells may hold user text (labels, names): control characters are escaped.
  auto safe = [](const std::vector<std::string>& r) {
    std::vector<std::string> out;
    for (const auto& cell : r) out.push_back(terminal_text(cell));
    return out;
  };
  const std::vector<std::string> header = safe(header_);
  std::vector<std::vector<std::string>> rows;
  for (const auto& r : rows_) rows.push_back(safe(r));
  std::vector<std::size_t> w(header.size(), 0);
  for (std::size_t c = 0; c < header.size(); ++c) w[c] = header[c].size();
  for (const auto& r : rows)
    for (std::size_t c = 0; c < r.size() && c < w.size(); ++c) w[c] = std::max(w[c], r[c].size());
  auto line = [&](const std::vector<std::string>& r) {
    std::string s;
    for (std::size_t c = 0; c < w.size(); ++c) {
      const std::string cell = c < r.size() ? r[c] : "";
      s += (c ? "  " : "") + fmt::format("{:>{}}", cell, w[c]);
    }
    return s + "\n";
  };
  std::string out = line(header);
  std::size_t total = 0;
  for (auto x : w) total += x + 2;
  out += std::string(total > 2 ? total - 2 : 0, '-') + "\n";
  for (const auto& r : rows) out += line(r);
  return out;
}

std::string TextTable::csv() const {
  auto quote = [](const std::string& s) {
    if (s.find_first_of(",\"\n") == std::string::npos) return s;
    std::string q = "\"";
    for (char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
    return q + "\"";
  };
  std::string out;
  auto line = [&](const std::vector<std::string>& r) {
    for (std::size_t c = 0; c < r.size(); ++c) out += (c ? "," : "") + quote(r[c]);
    out += "\n";
  };
  line(header_);
  for (const auto& r : rows_) line(r);
  return out;
}

std::string fmt_num(double x, int digits) {
  if (std::isinf(x)) return x > 0 ? "inf" : "-inf";
  if (std::isnan(x)) return "nan";
  return fmt::format("{:.{}g}", x, digits);
}

}  // namespace gapwise
