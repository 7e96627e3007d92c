#include "io/units_grammar.hpp"

#include <array>
#include <cctype>

namespace gapwise {
namespace {
constexpr std::array<std::string_view, 10> kSymbols{"ns", "us", "ms", "s", "GHz", "MHz", "kHz", "Hz", "K", "mK"};

// One factor at the front of `u`; returns its length, 0 when there is none.
std::size_t factor(std::string_view u) {
  std::size_t best = 0;
  for (std::string_view sym : kSymbols)
    if (u.substr(0, sym.size()) == sym && sym.size() > best) best = sym.size();
  if (best == 0) return 0;
  std::size_t k = best;
  if (k < u.size() && u[k] == '^') {
    ++k;
    if (k < u.size() && u[k] == '-') ++k;
    const std::size_t digits = k;
    while (k < u.size() && std::isdigit(static_cast<unsigned char>(u[k]))) ++k;
    if (k == digits) return 0;
  }
  return k;
}
}  // namespace

bool parseable_units(std::string_view u) {
  if (u == "1") return true;
  std::size_t n = factor(u);
  if (n == 0) return false;
  while (n < u.size()) {
    if (u[n] != '.' && u[n] != '/') return false;
    const std::size_t m = factor(u.substr(n + 1));
    if (m == 0) return false;
    n += 1 + m;
  }
  return true;
}

}  // namespace gapwise
