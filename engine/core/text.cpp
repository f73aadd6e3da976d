#include "core/text.hpp"

#include <unicode/normalizer2.h>
#include <unicode/unistr.h>

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdarg>
#include <cstdio>
#include <utility>

namespace strewn {

std::string name_key(std::string_view text) {
  UErrorCode status = U_ZERO_ERROR;
  const icu::Normalizer2* fold = icu::Normalizer2::getNFKCCasefoldInstance(status);
  if (U_FAILURE(status) || fold == nullptr) return ascii_lower(text);  // ICU's data missing
  const icu::UnicodeString folded =
      fold->normalize(icu::UnicodeString::fromUTF8(
                          icu::StringPiece(text.data(), static_cast<int32_t>(text.size()))),
                      status);
  if (U_FAILURE(status)) return ascii_lower(text);
  std::string out;
  folded.toUTF8String(out);
  return out;
}

std::size_t edit_distance(std::string_view a, std::string_view b) {
  const std::size_t n = a.size(), m = b.size();
  std::vector<std::size_t> prev2(m + 1), prev(m + 1), cur(m + 1);
  for (std::size_t j = 0; j <= m; ++j) prev[j] = j;
  for (std::size_t i = 1; i <= n; ++i) {
    cur[0] = i;
    for (std::size_t j = 1; j <= m; ++j) {
      const std::size_t cost = a[i - 1] == b[j - 1] ? 0 : 1;
      cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost});
      if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
        cur[j] = std::min(cur[j], prev2[j - 2] + 1);
    }
    prev2.swap(prev);
    prev.swap(cur);
  }
  return prev[m];
}

std::string ascii_lower(std::string_view text) {
  std::string out(text);
  std::transform(out.begin(), out.end(), out.begin(),
                 [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
  return out;
}

std::string closest_match(std::string_view word, const std::vector<std::string>& candidates) {
  const std::string word_lower = ascii_lower(word);
  std::string best;
  std::size_t best_distance = std::max<std::size_t>(1, word.size() / 3) + 1;
  for (const auto& candidate : candidates) {
    const std::string cand_lower = ascii_lower(candidate);
    std::size_t d = edit_distance(word_lower, cand_lower);
    // A key that contains the candidate or is contained in it (e.g. "drag_area" for "area") is a
    // likely intent too, but only when the shorter one is not trivially short.
    if (d >= best_distance && best_distance > 1 && std::min(word.size(), candidate.size()) >= 4 &&
        (cand_lower.find(word_lower) != std::string::npos ||
         word_lower.find(cand_lower) != std::string::npos))
      d = best_distance - 1;
    if (d < best_distance) {
      best_distance = d;
      best = candidate;
    }
  }
  return best;
}

std::string format_number(double value) {
  char buffer[64];
  auto [end, ec] = std::to_chars(buffer, buffer + sizeof buffer, value);
  if (ec != std::errc()) return "?";
  return std::string(buffer, end);
}

std::string printf_text(const char* format, ...) {
  std::va_list arguments;
  va_start(arguments, format);
  std::va_list again;
  va_copy(again, arguments);
  const int length = std::vsnprintf(nullptr, 0, format, arguments);
  va_end(arguments);
  std::string text(length > 0 ? static_cast<std::size_t>(length) : 0, '\0');
  if (length > 0) std::vsnprintf(text.data(), text.size() + 1, format, again);
  va_end(again);
  return text;
}

std::string csv_number(double value) {
  if (std::isnan(value)) return "";
  if (std::isinf(value)) return value > 0 ? "inf" : "-inf";
  return printf_text("%.10g", value);
}

std::pair<char32_t, std::size_t> decode_utf8(std::string_view text, std::size_t i) {
  const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[k]); };
  const unsigned char lead = byte(i);
  if (lead < 0x80) return {lead, 1};
  std::size_t length = 0;
  char32_t code = 0, lowest = 0;
  if (lead >= 0xC2 && lead <= 0xDF) {
    length = 2, code = lead & 0x1Fu, lowest = 0x80;
  } else if (lead >= 0xE0 && lead <= 0xEF) {
    length = 3, code = lead & 0x0Fu, lowest = 0x800;
  } else if (lead >= 0xF0 && lead <= 0xF4) {
    length = 4, code = lead & 0x07u, lowest = 0x10000;
  } else {
    return {0, 0};
  }
  if (i + length > text.size()) return {0, 0};
  for (std::size_t k = 1; k < length; ++k) {
    if ((byte(i + k) & 0xC0u) != 0x80u) return {0, 0};
    code = (code << 6) | (byte(i + k) & 0x3Fu);
  }
  if (code < lowest || code > 0x10FFFF || (code >= 0xD800 && code <= 0xDFFF)) return {0, 0};
  return {code, length};
}

bool acts_on_text(char32_t c) {
  return (c < 0x20 && c != U'\n' && c != U'\t') || (c >= 0x7F && c <= 0x9F) || c == 0x200E ||
         c == 0x200F || (c >= 0x202A && c <= 0x202E) || (c >= 0x2066 && c <= 0x2069);
}

std::size_t invalid_utf8_at(std::string_view text) {
  for (std::size_t i = 0; i < text.size();) {
    const auto [code, length] = decode_utf8(text, i);
    if (length == 0) return i;
    i += length;
  }
  return std::string_view::npos;
}

std::string printable(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size();) {
    const auto [code, length] = decode_utf8(text, i);
    if (length == 0) {
      out += printf_text("\\x%02X", static_cast<unsigned>(static_cast<unsigned char>(text[i])));
      ++i;
      continue;
    }
    if (acts_on_text(code))
      out += printf_text("\\u%04X", static_cast<unsigned>(code));
    else
      out.append(text.substr(i, length));
    i += length;
  }
  return out;
}

std::string csv_text(std::string_view text) {
  std::string cell;
  if (!text.empty() && std::string_view("=+-@\t\r").find(text.front()) != std::string_view::npos)
    cell += '\'';
  cell.append(text);
  if (cell.find_first_of(",\"\n\r") == std::string::npos) return cell;
  std::string quoted = "\"";
  for (char c : cell) quoted += c == '"' ? std::string("\"\"") : std::string(1, c);
  return quoted + '"';
}

std::string readable_number(double value, int significant) {
  std::string text = printf_text("%.*g", significant, value);
  if (text.find('e') != std::string::npos && std::abs(value) >= 1.0 && std::abs(value) < 1e12)
    text = printf_text("%.0f", value);
  return text;
}

}  // namespace strewn
