#pragma once
// Small text helpers for messages.
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace strewn {

/// Optimal string alignment distance (Damerau-Levenshtein with adjacent transpositions).
std::size_t edit_distance(std::string_view a, std::string_view b);

/// `text` with its ASCII letters in lower case (other bytes, UTF-8 included, as they are).
std::string ascii_lower(std::string_view text);

/// The form under which two names are the same name: Unicode's NFKC_Casefold (Unicode Standard
/// Annex #15 normalisation with compatibility mappings, case folding, and default-ignorable
/// characters such as U+200B removed; ICU's Normalizer2), so that "Crate", "CRATE", "Ｃｒａｔｅ"
/// and "Cra\u200Bte" are one name, and a name of only ignorable characters is empty. `text` must
/// be UTF-8.
std::string name_key(std::string_view text);

/// The candidate closest to `word` when it is plausibly a misspelling (distance at most a third of
/// its length, at least 1, or a case-insensitive match); empty otherwise.
std::string closest_match(std::string_view word, const std::vector<std::string>& candidates);

/// Shortest decimal text that reads back to the same double ("%.17g" trimmed).
std::string format_number(double value);

/// printf's text of its arguments (the compiler checks the format against them).
[[gnu::format(printf, 1, 2)]] std::string printf_text(const char* format, ...);

/// A number for a CSV cell: ten significant digits; empty for NaN (no value), "inf" or "-inf".
std::string csv_number(double value);

/// The code point starting at byte `i` of `text` and its length in bytes; length 0 when the bytes
/// there are not UTF-8 (RFC 3629, section 4).
std::pair<char32_t, std::size_t> decode_utf8(std::string_view text, std::size_t i);

/// The byte offset where `text` stops being UTF-8 (RFC 3629: no overlong forms, no surrogates,
/// nothing above U+10FFFF), or std::string_view::npos when it is UTF-8 throughout.
std::size_t invalid_utf8_at(std::string_view text);

/// Whether a character acts on the text around it rather than being shown: a control character
/// (C0 but line feed and tab, DEL, C1) or a bidirectional formatting character of Unicode's
/// UAX #9 (U+200E, U+200F, U+202A..U+202E, U+2066..U+2069).
bool acts_on_text(char32_t code);

/// Text as a terminal may show it, inert: control characters (C0 but line feed and tab, DEL,
/// C1) and the marks that reorder text (U+200E, U+200F, U+202A..U+202E, U+2066..U+2069, the
/// bidirectional controls of Unicode's UAX #9) written as \uXXXX, and bytes that are not UTF-8
/// as \xNN. Other text is left as it is.
std::string printable(std::string_view text);

/// A text cell of a CSV file: quoted when it holds a comma, a quote or a line break (RFC 4180),
/// and led by an apostrophe when a spreadsheet would take it for a formula (it starts with =, +,
/// -, @, a tab or a carriage return: OWASP, "CSV Injection"). Numbers are not text cells.
std::string csv_text(std::string_view text);

/// A number for a reader: `significant` figures, without an exponent from 1 up to 1e12 (16090,
/// not 1.609e+04); small numbers keep theirs (5.72e-09).
std::string readable_number(double value, int significant);

}  // namespace strewn
