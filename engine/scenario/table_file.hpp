#pragma once
// Reading the small CSV tables a scenario refers to (soundings, wind profiles): '#' comment lines,
// one header line naming the columns, then rows of numbers separated by commas.
#include <stdexcept>
#include <string>
#include <vector>

namespace strewn {

class TableFileError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

struct TableFile {
  struct Row {
    long line;
    std::vector<double> values;  // in the order of the requested columns
  };
  std::vector<Row> rows;
  std::vector<bool> present;  // per requested column: found in the header
};

/// Reads `path`, requiring the named columns (any order, others ignored); the columns from
/// `optional_from` on may be absent (their values are then NaN). Throws TableFileError naming
/// the file and line on a missing file, a missing column or a value that is not a finite number.
TableFile read_table_file(const std::string& path, const std::vector<std::string>& columns,
                          std::size_t optional_from = static_cast<std::size_t>(-1));

}  // namespace strewn
