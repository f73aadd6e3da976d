#pragma once
// One table of names per enum, beside the enum: the scenario's words, printing, files and
// messages all read it, so that each name is spelled once. An enum E gets its table by
// specialising EnumNames:
//
//   template <> struct EnumNames<CanopyState> {
//     static constexpr std::array names{std::pair{CanopyState::none, "none"}, ...};
//   };
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace strewn {

template <class E>
struct EnumNames;  // specialised per enum, with `names`: (value, name) pairs in a fixed order

/// The name of `value` ("?" for a value outside the table).
template <class E>
constexpr const char* name_of(E value) {
  for (const auto& [v, name] : EnumNames<E>::names)
    if (v == value) return name;
  return "?";
}

/// The value named `name`, or none.
template <class E>
constexpr std::optional<E> enum_from_name(std::string_view name) {
  for (const auto& [v, n] : EnumNames<E>::names)
    if (name == n) return v;
  return std::nullopt;
}

/// Every name, in the table's order: the words a scenario may use, for parsing and messages.
template <class E>
std::vector<std::string> enum_names() {
  std::vector<std::string> out;
  for (const auto& entry : EnumNames<E>::names) out.emplace_back(entry.second);
  return out;
}

}  // namespace strewn
