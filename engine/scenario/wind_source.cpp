#include "scenario/wind_source.hpp"

#include <algorithm>
#include <cstring>
#include <stdexcept>

namespace strewn {

namespace {
constexpr std::size_t kSources = std::variant_size_v<WindSources>;
template <std::size_t i>
using SourceAt = std::variant_alternative_t<i, WindSources>;

// Each source's name is its own: the scenario chooses a source by it.
template <std::size_t... i>
constexpr bool names_are_unique(std::index_sequence<i...>) {
  const std::array<std::string_view, kSources> names{SourceAt<i>::name...};
  for (std::size_t a = 0; a < kSources; ++a)
    for (std::size_t b = a + 1; b < kSources; ++b)
      if (names[a] == names[b]) return false;
  return true;
}
static_assert(names_are_unique(std::make_index_sequence<kSources>{}),
              "each registered wind source needs its own name");

// The settings' alternative i is source i's: a source is known by its settings' index.
template <std::size_t... i>
constexpr bool settings_follow_sources(std::index_sequence<i...>) {
  return (
      std::is_same_v<std::variant_alternative_t<i, WindSettings>, typename SourceAt<i>::Settings> &&
      ...);
}
static_assert(settings_follow_sources(std::make_index_sequence<kSources>{}));

// The keys lent to a source, which may read only the keys it declares: the loader names every
// other source's keys as theirs, and `echo` writes back what `keys` lists.
template <class Source>
class DeclaredKeys final : public WindSourceKeys {
 public:
  explicit DeclaredKeys(WindSourceKeys& keys) : keys_(keys) {}
  double number(const char* key, const Bounds& bounds, bool required, double fallback) override {
    return keys_.number(declared(key), bounds, required, fallback);
  }
  Uncertain sampled(const char* name, Uncertain input) override {
    return keys_.sampled(name, input);
  }
  WindFiles profile_files(const char* key) override { return keys_.profile_files(declared(key)); }

 private:
  static const char* declared(const char* key) {
    if (std::none_of(Source::keys.begin(), Source::keys.end(),
                     [&](const char* k) { return std::strcmp(k, key) == 0; }))
      throw std::logic_error(std::string("wind source \"") + Source::name + "\" reads key \"" +
                             key + "\" that its `keys` does not declare");
    return key;
  }
  WindSourceKeys& keys_;
};

template <std::size_t... i>
std::optional<WindSettings> read(const std::string& name, WindSourceKeys& keys,
                                 std::index_sequence<i...>) {
  std::optional<WindSettings> settings;
  auto read_one = [&]<std::size_t n>() {
    if (!settings && name == SourceAt<n>::name) {
      DeclaredKeys<SourceAt<n>> declared(keys);
      settings.emplace(std::in_place_index<n>, SourceAt<n>::Settings::read(declared));
    }
  };
  (read_one.template operator()<i>(), ...);
  return settings;
}

template <std::size_t... i>
WindSources make(const WindSettings& settings, const WindBase& base, std::index_sequence<i...>) {
  std::optional<WindSources> source;
  auto make_one = [&]<std::size_t n>() {
    if (settings.index() == n) source.emplace(std::in_place_index<n>, std::get<n>(settings), base);
  };
  (make_one.template operator()<i>(), ...);
  if (!source) throw std::logic_error("make_wind_source: settings of no registered source");
  return std::move(*source);
}
}  // namespace

std::vector<std::string> wind_source_names() {
  std::vector<std::string> names;
  [&]<std::size_t... i>(std::index_sequence<i...>) {
    (names.emplace_back(SourceAt<i>::name), ...);
  }
  (std::make_index_sequence<kSources>{});
  return names;
}

std::optional<WindSettings> read_wind_source(const std::string& name, WindSourceKeys& keys) {
  return read(name, keys, std::make_index_sequence<kSources>{});
}

std::vector<std::pair<std::string, bool>> wind_source_keys(const WindSettings& settings) {
  std::vector<std::pair<std::string, bool>> keys;
  auto add = [&](const auto& source_keys, bool own) {
    for (const char* key : source_keys) {
      auto known =
          std::find_if(keys.begin(), keys.end(), [&](const auto& k) { return k.first == key; });
      if (known == keys.end())
        keys.emplace_back(key, own);
      else
        known->second = known->second || own;
    }
  };
  [&]<std::size_t... i>(std::index_sequence<i...>) {
    (add(SourceAt<i>::keys, settings.index() == i), ...);
  }
  (std::make_index_sequence<kSources>{});
  return keys;
}

const char* wind_source_name(const WindSettings& settings) {
  const char* name = "";
  [&]<std::size_t... i>(std::index_sequence<i...>) {
    ((settings.index() == i ? (name = SourceAt<i>::name) : name), ...);
  }
  (std::make_index_sequence<kSources>{});
  return name;
}

std::span<const std::vector<WindLayer>> own_wind_profiles(const WindSettings& settings) {
  return std::visit([](const auto& s) { return s.own_profiles(); }, settings);
}

WindSources make_wind_source(const WindSettings& settings, const WindBase& base) {
  return make(settings, base, std::make_index_sequence<kSources>{});
}

}  // namespace strewn
