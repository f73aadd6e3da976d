#pragma once
// Small text helpers for messages.
#include <string>
#include <string_view>
#include <vector>

namespace strewn {

/// Optimal string alignment distance (Damerau-Levenshtein with adjacent transpositions).
std::size_t edit_distance(std::string_view a, std::string_view b);

/// The candidate closest to `word` when it is plausibly a misspelling (distance at most a third of
/// its length, at least 1, or a case-insensitive match); empty otherwise.
std::string closest_match(std::string_view word, const std::vector<std::string>& candidates);

/// Shortest decimal text that reads back to the same double ("%.17g" trimmed).
std::string format_number(double value);

/// printf's text of its arguments (the compiler checks the format against them).
[[gnu::format(printf, 1, 2)]] std::string printf_text(const char* format, ...);

/// A number for a CSV cell: ten significant digits; empty for NaN (no value), "inf" or "-inf".
std::string csv_number(double value);

/// A number for a reader: `significant` figures, without an exponent from 1 up to 1e12 (16090,
/// not 1.609e+04); small numbers keep theirs (5.72e-09).
std::string readable_number(double value, int significant);

}  // namespace strewn
