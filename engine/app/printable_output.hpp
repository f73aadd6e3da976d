#pragma once
// What strewn writes to a terminal (standard output and error) passes through a PrintableOutput:
// a title, a body name or a file name holding control or escape sequences, marks that reorder
// text, or bytes that are not UTF-8 reaches the terminal inert (core/text.hpp, printable()),
// so that no input can move the cursor, retitle the window or hide text. JSON written there
// stays JSON: its strings hold no raw control characters, and the \uXXXX written instead of a
// mark is JSON's own escape of it.
#include <streambuf>
#include <string>

namespace strewn {

class PrintableOutput final : public std::streambuf {
 public:
  explicit PrintableOutput(std::streambuf* target) : target_(target) {}
  ~PrintableOutput() override;
  PrintableOutput(const PrintableOutput&) = delete;
  PrintableOutput& operator=(const PrintableOutput&) = delete;

  /// Whether a write to the target failed (a full disk behind `> summary.json`, a closed pipe).
  [[nodiscard]] bool failed() const { return failed_; }
  /// The errno of the first failed write (0 when none said why).
  [[nodiscard]] int error() const { return error_; }

 protected:
  int_type overflow(int_type c) override;
  std::streamsize xsputn(const char* s, std::streamsize n) override;
  int sync() override;

 private:
  // Writes what is pending up to its last whole character (a character split between two writes
  // waits for its end), or all of it.
  void pass(bool all);
  void fail();

  std::streambuf* target_;
  std::string pending_;
  bool failed_ = false;
  int error_ = 0;
};

}  // namespace strewn
