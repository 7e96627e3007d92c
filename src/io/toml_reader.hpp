#pragma once
// Typed access to a parsed TOML document that turns every failure into an
// InputError naming file, line and key. Used by every file parser.
//
//   TomlReader r = TomlReader::open("problem.toml");
//   r.allow_keys(r.root(), "", {"format", "qubits", ...});  // unknown key -> error
//   int n = r.require_int(r.root(), "qubits", "");
#include <initializer_list>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#define TOML_HEADER_ONLY 0
#include <toml++/toml.h>

#include "io/input_error.hpp"

namespace gapwise {

/// A TOML basic string literal for `text`, quotes included, with escapes
/// (for the writers of problem and schedule files).
std::string toml_quoted(std::string_view text);

/// Largest input file read_text_file accepts (problem files for 30 qubits are a
/// few tens of KiB; anything far larger is the wrong file).
inline constexpr std::size_t kMaxInputFileBytes = std::size_t{64} << 20;

/// Whole file as text; an unreadable file, a read error or a file above
/// kMaxInputFileBytes is an InputError naming the path and the reason.
std::string read_text_file(const std::string& path);

/// Deepest nesting TomlReader accepts: the components of a table header plus
/// those of a dotted key plus one per enclosing array or inline table. gapwise's
/// own files nest three or four levels; toml++ recurses once per level and
/// overflows the stack a few thousand levels down.
inline constexpr int kMaxTomlNesting = 64;

struct TomlNesting {
  int depth = 0;  ///< levels, counted as for kMaxTomlNesting
  int line = 0;   ///< 1-based line where that depth is first reached
};

/// The deepest nesting of a TOML text and where it is first reached, read
/// without parsing (strings and comments skipped); nullopt for a text with no
/// keys. Used by TomlReader before it hands a text to toml++.
std::optional<TomlNesting> deepest_toml_nesting(std::string_view text);

class TomlReader {
 public:
  /// Parses a file; syntax errors and unreadable files become InputError.
  static TomlReader open(const std::string& path);
  /// Parses text (for tests and fuzzing); `name` stands in for the file name.
  static TomlReader from_string(std::string_view text, const std::string& name);

  const toml::table& root() const { return root_; }
  const std::string& file() const { return file_; }

  /// Place of a node (line/column) under a dotted key.
  SourcePlace place(const toml::node* node, const std::string& key) const;
  [[noreturn]] void fail(const toml::node* node, const std::string& key, const std::string& problem,
                         const std::string& fix) const;

  /// The header every gapwise file shares: `format` must be `format` (required or
  /// optional) and `format_version`, when given, must be `version`. `what` names
  /// the kind of file in messages ("problem", "embedding").
  void check_format(const toml::table& table, std::string_view format, std::string_view what, bool required,
                    long long version = 1) const;

  /// Every key of `table` must be one of `allowed`, else InputError naming it.
  void allow_keys(const toml::table& table, const std::string& prefix,
                  std::initializer_list<std::string_view> allowed) const;

  const toml::node* find(const toml::table& table, std::string_view key) const;
  std::string key_path(const std::string& prefix, std::string_view key) const;

  double require_double(const toml::table& t, std::string_view key, const std::string& prefix) const;
  std::optional<double> get_double(const toml::table& t, std::string_view key, const std::string& prefix) const;
  long long require_int(const toml::table& t, std::string_view key, const std::string& prefix) const;
  std::optional<long long> get_int(const toml::table& t, std::string_view key, const std::string& prefix) const;
  std::string require_string(const toml::table& t, std::string_view key, const std::string& prefix) const;
  std::optional<std::string> get_string(const toml::table& t, std::string_view key, const std::string& prefix) const;
  const toml::array* get_array(const toml::table& t, std::string_view key, const std::string& prefix) const;
  const toml::table* get_table(const toml::table& t, std::string_view key, const std::string& prefix) const;

  /// A number (integer or float) that must be finite; `key` names it in errors.
  double number(const toml::node& node, const std::string& key) const;
  long long integer(const toml::node& node, const std::string& key) const;
  std::vector<double> number_list(const toml::array& arr, const std::string& key) const;

 private:
  TomlReader(toml::table root, std::string file) : root_(std::move(root)), file_(std::move(file)) {}
  toml::table root_;
  std::string file_;
};

}  // namespace gapwise
