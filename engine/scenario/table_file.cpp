#include "scenario/table_file.hpp"

#include <charconv>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <sstream>

#include "core/text.hpp"

namespace strewn {

namespace {
constexpr std::size_t kAbsent = static_cast<std::size_t>(-1);  // an optional column not there

std::string trim(const std::string& s) {
  const auto a = s.find_first_not_of(" \t\r");
  if (a == std::string::npos) return "";
  const auto b = s.find_last_not_of(" \t\r");
  return s.substr(a, b - a + 1);
}

std::vector<std::string> split(const std::string& line) {
  std::vector<std::string> out;
  std::string cell;
  std::istringstream in(line);
  while (std::getline(in, cell, ',')) out.push_back(trim(cell));
  if (!line.empty() && line.back() == ',') out.emplace_back();
  return out;
}

// Where each requested column sits in the header `cells` (kAbsent: an optional one not there).
std::vector<std::size_t> header_columns(const std::vector<std::string>& cells,
                                        const std::vector<std::string>& columns,
                                        std::size_t optional_from, const std::string& where) {
  std::vector<std::size_t> index;
  for (const auto& column : columns) {
    std::size_t found = cells.size();
    for (std::size_t i = 0; i < cells.size(); ++i) {
      if (cells[i] != column) continue;
      if (found != cells.size())
        throw TableFileError(where + ": the header names column \"" + column +
                             "\" twice; which one holds the values is not clear");
      found = i;
    }
    if (found != cells.size()) {
      index.push_back(found);
    } else if (index.size() >= optional_from) {
      index.push_back(kAbsent);
    } else {
      std::string all;
      for (const auto& c : columns) all += (all.empty() ? "" : ", ") + c;
      throw TableFileError(where + ": the header lacks column \"" + column +
                           "\" (expected columns: " + all + ")");
    }
  }
  return index;
}
}  // namespace

TableFile read_table_file(const std::string& path, const std::vector<std::string>& columns,
                          std::size_t optional_from) {
  // A regular file of sane size only: a device (/dev/zero), a pipe or a folder would make the
  // reading hang or fail obscurely.
  constexpr std::uintmax_t kLargest = std::uintmax_t{64} << 20;
  std::error_code fs_error;
  const auto status = std::filesystem::status(path, fs_error);
  if (fs_error || !std::filesystem::exists(status))
    throw TableFileError(path + ": cannot be read (no such file, or no permission)");
  if (!std::filesystem::is_regular_file(status))
    throw TableFileError(path + ": is not a regular file (a table must be a CSV file)");
  if (std::filesystem::file_size(path, fs_error) > kLargest)
    throw TableFileError(path + ": is larger than 64 MiB; a sounding or wind table is far smaller");
  std::ifstream in(path);
  if (!in) throw TableFileError(path + ": cannot be read (no such file, or no permission)");
  TableFile table;
  std::vector<std::size_t> index;
  std::string line;
  long number = 0;
  while (std::getline(in, line)) {
    ++number;
    // A byte-order mark that some editors put before the first line is not part of the header;
    // line ends of CR LF lose their CR in trim().
    if (number == 1 && line.starts_with("\xEF\xBB\xBF")) line.erase(0, 3);
    if (const auto bad = invalid_utf8_at(line); bad != std::string::npos)
      throw TableFileError(path + ":" + std::to_string(number) + ": byte " +
                           std::to_string(bad + 1) +
                           " of the line is not UTF-8 text (is the file in another encoding?)");
    const std::string content = trim(line);
    if (content.empty() || content[0] == '#') continue;
    const auto cells = split(content);
    if (table.present.empty()) {
      index = header_columns(cells, columns, optional_from, path + ":" + std::to_string(number));
      for (std::size_t k : index) table.present.push_back(k != kAbsent);
      continue;
    }
    TableFile::Row row{number, {}};
    for (std::size_t k = 0; k < index.size(); ++k) {
      if (index[k] == kAbsent) {
        row.values.push_back(std::numeric_limits<double>::quiet_NaN());
        continue;
      }
      if (index[k] >= cells.size())
        throw TableFileError(path + ":" + std::to_string(number) + ": missing value for \"" +
                             columns[k] + "\"");
      const std::string& cell = cells[index[k]];
      double value = 0.0;
      const auto [end, ec] = std::from_chars(cell.data(), cell.data() + cell.size(), value);
      if (ec != std::errc() || end != cell.data() + cell.size() || !std::isfinite(value))
        throw TableFileError(path + ":" + std::to_string(number) + ": \"" + cell +
                             "\" is not a finite number (column \"" + columns[k] + "\")");
      row.values.push_back(value);
    }
    table.rows.push_back(std::move(row));
  }
  if (table.present.empty()) throw TableFileError(path + ": no header line (is the file empty?)");
  return table;
}

}  // namespace strewn
