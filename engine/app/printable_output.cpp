#include "app/printable_output.hpp"

#include <cerrno>
#include <cstring>

#include "core/text.hpp"

namespace strewn {

namespace {
// Text is passed on at each line end, or once this much is pending.
constexpr std::size_t kPassAt = 8192;

// How many bytes at the end of `text` begin a UTF-8 character that is not complete yet (0 when
// the text ends on a whole character or on bytes that cannot start one).
std::size_t unfinished_tail(const std::string& text) {
  const std::size_t n = text.size();
  for (std::size_t back = 1; back <= 3 && back <= n; ++back) {
    const auto byte = static_cast<unsigned char>(text[n - back]);
    if ((byte & 0xC0u) == 0x80u) continue;  // a continuation byte: look further back
    const std::size_t length = byte >= 0xF0 ? 4 : byte >= 0xE0 ? 3 : byte >= 0xC0 ? 2 : 1;
    return length > back ? back : 0;
  }
  return 0;
}
}  // namespace

PrintableOutput::~PrintableOutput() {
  pass(true);
}

PrintableOutput::int_type PrintableOutput::overflow(int_type c) {
  if (traits_type::eq_int_type(c, traits_type::eof())) return traits_type::not_eof(c);
  pending_ += traits_type::to_char_type(c);
  if (c == '\n' || pending_.size() >= kPassAt) pass(false);
  return failed_ ? traits_type::eof() : c;
}

std::streamsize PrintableOutput::xsputn(const char* s, std::streamsize n) {
  pending_.append(s, static_cast<std::size_t>(n));
  if (pending_.size() >= kPassAt || std::memchr(s, '\n', static_cast<std::size_t>(n)) != nullptr)
    pass(false);
  return failed_ ? 0 : n;
}

int PrintableOutput::sync() {
  pass(true);
  if (target_->pubsync() != 0) fail();
  return failed_ ? -1 : 0;
}

void PrintableOutput::pass(bool all) {
  if (pending_.empty()) return;
  const std::size_t keep = all ? 0 : unfinished_tail(pending_);
  const std::string text = printable(std::string_view(pending_).substr(0, pending_.size() - keep));
  pending_.erase(0, pending_.size() - keep);
  const auto size = static_cast<std::streamsize>(text.size());
  if (target_->sputn(text.data(), size) != size) fail();
}

void PrintableOutput::fail() {
  if (!failed_) error_ = errno;
  failed_ = true;
}

}  // namespace strewn
