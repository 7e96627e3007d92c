#pragma once
// Plain-text tables for the terminal and CSV for spreadsheets, from one model.
//
//   TextTable t({"t_ns", "p_ground"});
//   t.add({"100", "0.93"});
//   std::cout << t.render();      // aligned columns
//   write_file_atomically("out.csv", t.csv());
#include <string>
#include <vector>

namespace gapwise {

class TextTable {
 public:
  explicit TextTable(std::vector<std::string> header) : header_(std::move(header)) {}
  void add(std::vector<std::string> row) { rows_.push_back(std::move(row)); }
  std::string render() const;
  std::string csv() const;
  std::size_t size() const { return rows_.size(); }

 private:
  std::vector<std::string> header_;
  std::vector<std::vector<std::string>> rows_;
};

/// Number formatting used in tables: up to `digits` significant digits.
std::string fmt_num(double x, int digits = 6);

}  // namespace gapwise
