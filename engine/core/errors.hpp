#pragma once
// Typed errors thrown by library code. Only app/main turns them into messages and exit codes
// (2 for invalid input, 3 for run-time failures), so the library never exits the process.
#include <stdexcept>
#include <string>
#include <vector>

namespace strewn {

/// One problem found in a scenario: the file, the key path (e.g. `body[0].drag.cd.sd`), the line
/// where the parser knows it (0 otherwise) and what was expected.
struct Problem {
  std::string file;
  std::string key_path;
  long line = 0;
  std::string message;

  /// "file:line: key.path: message" (line and key omitted when unknown).
  [[nodiscard]] std::string describe() const;
};

/// An invalid scenario; carries every problem found in one pass. Exit status 2.
class ScenarioError : public std::runtime_error {
 public:
  explicit ScenarioError(std::vector<Problem> problems);
  [[nodiscard]] const std::vector<Problem>& problems() const { return problems_; }

 private:
  std::vector<Problem> problems_;
};

/// A bad command-line request or argument outside the scenario (exit status 2).
class UsageError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// An input file that is not what it must be: a results file that is missing, truncated, of
/// another format version or not HDF5 (exit status 2: the request is wrong, not the machine).
class InputFileError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// An input/output failure: unreadable or unwritable files (exit status 3).
class IoError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

}  // namespace strewn
