#include "io/toml_reader.hpp"

#include <cerrno>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <sstream>

#include <fcntl.h>
#include <unistd.h>

#include <fmt/format.h>

#include "io/input_path.hpp"

namespace gapwise {
namespace {

std::string type_name(const toml::node& n) {
  switch (n.type()) {
    case toml::node_type::table: return "a table";
    case toml::node_type::array: return "an array";
    case toml::node_type::string: return "a string";
    case toml::node_type::integer: return "an integer";
    case toml::node_type::floating_point: return "a number";
    case toml::node_type::boolean: return "a boolean";
    default: return "a date/time";
  }
}

}  // namespace

std::string toml_quoted(std::string_view text) {
  // Always a basic string with escapes. toml++'s own writer picks a multi-line
  // literal string for text with newlines, and TOML drops a newline right after
  // the opening delimiter: a leading newline did not survive (found by fuzzing).
  std::string out = "\"";
  for (const char ch : text) {
    const auto c = static_cast<unsigned char>(ch);
    switch (c) {
      case '"': out += "\\\""; break;
      case '\\': out += "\\\\"; break;
      case '\n': out += "\\n"; break;
      case '\t': out += "\\t"; break;
      case '\r': out += "\\r"; break;
      default:
        if (c < 0x20 || c == 0x7f) out += fmt::format("\\u{:04X}", c);
        else out += ch;
    }
  }
  return out + "\"";
}

std::string read_text_file(const std::string& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec))
    throw InputError({path, 0, 0, ""}, "this is a directory, not a file", "give the path of a file");
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) {
    const PathProblem why = describe_path_error(path, errno);
    throw InputError({path, 0, 0, ""}, why.problem, why.fix);
  }
  // Read errors must not pass for an empty or truncated file.
  std::string text;
  char buf[1 << 16];
  for (;;) {
    const ssize_t got = ::read(fd, buf, sizeof buf);
    if (got == 0) break;
    if (got < 0) {
      if (errno == EINTR) continue;
      const int err = errno;
      ::close(fd);
      throw InputError({path, 0, 0, ""}, fmt::format("reading the file failed ({})", std::strerror(err)),
                       "check the disk or copy the file to a readable place");
    }
    text.append(buf, static_cast<std::size_t>(got));
    if (text.size() > kMaxInputFileBytes) {
      ::close(fd);
      throw InputError({path, 0, 0, ""},
                       fmt::format("the file is larger than {} MiB; gapwise input files are small text files",
                                   kMaxInputFileBytes >> 20),
                       "check that this is the intended file");
    }
  }
  ::close(fd);
  return text;
}

TomlReader TomlReader::open(const std::string& path) { return from_string(read_text_file(path), path); }

std::optional<TomlNesting> deepest_toml_nesting(std::string_view text) {
  // A light lexer: strings and comments are skipped (dots and brackets in them
  // mean nothing), keys are read where TOML expects one (at the start of a line
  // outside any value, after `{` or `,` inside an inline table), and the depth
  // of every value is the components of its table header, plus those of its
  // (dotted) key, plus one per enclosing array or inline table. Syntax errors
  // are left to toml++; this only has to see every way of nesting.
  struct Open {
    char close;
    int depth;  ///< depth of the values directly inside
  };
  std::vector<Open> open;
  int header = 0;          // components of the current [table] header
  int line = 1;
  TomlNesting deepest{0, 0};
  bool key_mode = true;    // reading a key (top level after a newline, or in an inline table)
  bool header_mode = false;
  int components = 1;      // of the key or header being read
  std::size_t i = 0;
  auto note = [&](int depth) {
    if (depth > deepest.depth) deepest = {depth, line};
  };
  auto skip_string = [&]() {  // at a quote; leaves i after the closing quote
    const char q = text[i];
    const bool multi = text.substr(i, 3) == std::string(3, q);
    i += multi ? 3 : 1;
    while (i < text.size()) {
      if (text[i] == '\\' && q == '"') {  // an escape (a line-ending backslash in a multi-line string)
        if (i + 1 < text.size() && text[i + 1] == '\n') ++line;
        i += 2;
        continue;
      }
      if (text[i] == '\n') {
        if (!multi) return;  // unterminated: toml++ reports it (the main loop counts this line end)
        ++line;
      }
      if (multi ? text.substr(i, 3) == std::string(3, q) : text[i] == q) {
        i += multi ? 3 : 1;
        while (multi && i < text.size() && text[i] == q) ++i;  // up to two quotes may close the content
        return;
      }
      ++i;
    }
  };
  const auto value_depth = [&]() { return (open.empty() ? header : open.back().depth) + components; };
  while (i < text.size()) {
    const char c = text[i];
    if (c == '"' || c == '\'') {
      skip_string();
      continue;
    }
    if (c == '#') {
      while (i < text.size() && text[i] != '\n') ++i;
      continue;
    }
    if (c == '\n') {
      ++line;
      if (open.empty()) {
        key_mode = true;
        header_mode = false;
        components = 1;
      }
      ++i;
      continue;
    }
    if (header_mode) {
      if (c == '.') ++components;
      if (c == ']') {
        header = components + (text.substr(i, 2) == "]]" ? 1 : 0);  // [[x]]: an array of tables
        note(header);
        header_mode = false;
        key_mode = false;
        i += text.substr(i, 2) == "]]" ? 2 : 1;
        continue;
      }
      ++i;
      continue;
    }
    if (key_mode) {
      if (c == '[' && open.empty()) {
        header_mode = true;
        components = 1;
        i += text.substr(i, 2) == "[[" ? 2 : 1;
        continue;
      }
      if (c == '.') ++components;
      if (c == '=') {
        note(value_depth());
        key_mode = false;
      }
      if (c == '}' && !open.empty()) open.pop_back();  // an empty inline table
      ++i;
      continue;
    }
    // Inside a value.
    if (c == '[' || c == '{') {
      // The container sits at the depth of its key (or, in an array, one below the array).
      const int d = (open.empty() || open.back().close == '}') ? value_depth() : open.back().depth + 1;
      note(d);
      open.push_back({c == '[' ? ']' : '}', d});
      if (c == '{') {
        key_mode = true;
        components = 1;
      }
    } else if ((c == ']' || c == '}') && !open.empty()) {
      open.pop_back();
    } else if (c == ',' && !open.empty() && open.back().close == '}') {
      key_mode = true;
      components = 1;
    }
    ++i;
  }
  if (deepest.depth == 0) return std::nullopt;
  return deepest;
}

TomlReader TomlReader::from_string(std::string_view text, const std::string& name) {
  // toml++ recurses once per level of nesting (building and destroying nested
  // tables): a few thousand dotted key parts or header parts overflow the
  // stack. It caps nested arrays and inline tables itself, not keys.
  if (const auto deep = deepest_toml_nesting(text); deep && deep->depth > kMaxTomlNesting)
    throw InputError({name, deep->line, 0, ""},
                     fmt::format("tables, keys and arrays nest {} levels deep here; gapwise reads at most {}",
                                 deep->depth, kMaxTomlNesting),
                     "gapwise files nest a few levels (e.g. [path.pause]): check the dotted key or [table] "
                     "header on this line");
  try {
    return TomlReader(toml::parse(text, name), name);
  } catch (const toml::parse_error& e) {
    const auto& src = e.source();
    throw InputError({name, static_cast<int>(src.begin.line), static_cast<int>(src.begin.column), ""},
                     fmt::format("TOML syntax error: {}", e.description()),
                     "correct the syntax at that place (see the file format in the user guide)");
  }
}

SourcePlace TomlReader::place(const toml::node* node, const std::string& key) const {
  SourcePlace p{file_, 0, 0, key};
  if (node) {
    p.line = static_cast<int>(node->source().begin.line);
    p.column = static_cast<int>(node->source().begin.column);
  }
  return p;
}

void TomlReader::fail(const toml::node* node, const std::string& key, const std::string& problem,
                      const std::string& fix) const {
  throw InputError(place(node, key), problem, fix);
}

std::string TomlReader::key_path(const std::string& prefix, std::string_view key) const {
  return prefix.empty() ? std::string(key) : prefix + "." + std::string(key);
}

void TomlReader::check_format(const toml::table& t, std::string_view format, std::string_view what, bool required,
                              long long version) const {
  const auto f = get_string(t, "format", "");
  if (!f && required)
    fail(&t, "format", "required key is missing", fmt::format("add `format = \"{}\"` at the top", format));
  if (f && *f != format)
    fail(t.get("format"), "format", fmt::format("this is not a gapwise {} file (format = \"{}\")", what, *f),
         fmt::format("set format = \"{}\"", format));
  const long long v = get_int(t, "format_version", "").value_or(version);
  if (v != version)
    fail(t.get("format_version"), "format_version", fmt::format("format_version {} is not known to this gapwise", v),
         fmt::format("set format_version = {}", version));
}

void TomlReader::allow_keys(const toml::table& table, const std::string& prefix,
                            std::initializer_list<std::string_view> allowed) const {
  for (auto&& [k, v] : table) {
    bool ok = false;
    for (auto a : allowed) ok = ok || (k.str() == a);
    if (!ok) {
      std::string list;
      for (auto a : allowed) list += (list.empty() ? "" : ", ") + std::string(a);
      SourcePlace p{file_, static_cast<int>(k.source().begin.line),
                    static_cast<int>(k.source().begin.column), key_path(prefix, k.str())};
      throw InputError(p, "unknown key", "remove it or use one of: " + list);
    }
  }
}

const toml::node* TomlReader::find(const toml::table& table, std::string_view key) const {
  return table.get(key);
}

double TomlReader::number(const toml::node& node, const std::string& key) const {
  double v;
  if (auto i = node.as_integer()) v = static_cast<double>(i->get());
  else if (auto f = node.as_floating_point()) v = f->get();
  else fail(&node, key, "expected a number, found " + type_name(node), "write a number such as 1.5");
  if (!std::isfinite(v)) fail(&node, key, "the number is not finite (inf or nan)", "write a finite number");
  return v;
}

long long TomlReader::integer(const toml::node& node, const std::string& key) const {
  if (auto i = node.as_integer()) return i->get();
  if (auto f = node.as_floating_point()) {
    const double x = f->get();
    if (std::isfinite(x) && x == std::floor(x) && std::abs(x) < 9e15) return static_cast<long long>(x);
  }
  fail(&node, key, "expected an integer, found " + type_name(node), "write a whole number such as 3");
}

std::vector<double> TomlReader::number_list(const toml::array& arr, const std::string& key) const {
  std::vector<double> out;
  out.reserve(arr.size());
  for (std::size_t k = 0; k < arr.size(); ++k) out.push_back(number(*arr.get(k), fmt::format("{}[{}]", key, k)));
  return out;
}

std::optional<double> TomlReader::get_double(const toml::table& t, std::string_view key,
                                             const std::string& prefix) const {
  const toml::node* n = t.get(key);
  if (!n) return std::nullopt;
  return number(*n, key_path(prefix, key));
}

double TomlReader::require_double(const toml::table& t, std::string_view key, const std::string& prefix) const {
  auto v = get_double(t, key, prefix);
  if (!v) fail(&t, key_path(prefix, key), "required key is missing", fmt::format("add `{} = <number>`", key));
  return *v;
}

std::optional<long long> TomlReader::get_int(const toml::table& t, std::string_view key,
                                             const std::string& prefix) const {
  const toml::node* n = t.get(key);
  if (!n) return std::nullopt;
  return integer(*n, key_path(prefix, key));
}

long long TomlReader::require_int(const toml::table& t, std::string_view key, const std::string& prefix) const {
  auto v = get_int(t, key, prefix);
  if (!v) fail(&t, key_path(prefix, key), "required key is missing", fmt::format("add `{} = <integer>`", key));
  return *v;
}

std::optional<std::string> TomlReader::get_string(const toml::table& t, std::string_view key,
                                                  const std::string& prefix) const {
  const toml::node* n = t.get(key);
  if (!n) return std::nullopt;
  if (auto s = n->as_string()) return s->get();
  fail(n, key_path(prefix, key), "expected a string, found " + type_name(*n), "write a quoted string");
}

std::string TomlReader::require_string(const toml::table& t, std::string_view key, const std::string& prefix) const {
  auto v = get_string(t, key, prefix);
  if (!v) fail(&t, key_path(prefix, key), "required key is missing", fmt::format("add `{} = \"...\"`", key));
  return *v;
}

const toml::array* TomlReader::get_array(const toml::table& t, std::string_view key, const std::string& prefix) const {
  const toml::node* n = t.get(key);
  if (!n) return nullptr;
  if (auto a = n->as_array()) return a;
  fail(n, key_path(prefix, key), "expected an array, found " + type_name(*n), "write a list in [ ... ]");
}

const toml::table* TomlReader::get_table(const toml::table& t, std::string_view key, const std::string& prefix) const {
  const toml::node* n = t.get(key);
  if (!n) return nullptr;
  if (auto a = n->as_table()) return a;
  fail(n, key_path(prefix, key), "expected a table, found " + type_name(*n), fmt::format("write a [{}] section", key));
}

}  // namespace gapwise
