#include "flight/drag.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace strewn {

namespace {

// One law's facts, from its declarations.
template <class Law>
constexpr DragModelFacts facts_of() {
  return {Law::name, std::span<const DragInput>(Law::inputs), Law::takes_mach_table, Law::validity};
}

template <std::size_t... i>
constexpr std::array<DragModelFacts, kDragModels> all_facts(std::index_sequence<i...>) {
  return {facts_of<std::variant_alternative_t<i, DragLaws>>()...};
}
constexpr std::array<DragModelFacts, kDragModels> kFacts =
    all_facts(std::make_index_sequence<kDragModels>{});

// Builds alternative `i` of DragLaws when it is `model`.
template <std::size_t... i>
DragLaws make_law(DragModel model, std::span<const double> values, std::index_sequence<i...>) {
  DragLaws law;
  auto make = [&]<std::size_t n>() {
    using Law = std::variant_alternative_t<n, DragLaws>;
    if (model == n)
      law.template emplace<n>(
          std::span<const double, Law::inputs.size()>(values.data(), Law::inputs.size()));
  };
  (make.template operator()<i>(), ...);
  return law;
}

}  // namespace

const DragModelFacts& drag_model_facts(DragModel model) {
  return kFacts.at(model);
}

std::optional<DragModel> drag_model_named(std::string_view name) {
  for (std::size_t i = 0; i < kFacts.size(); ++i)
    if (name == kFacts[i].name) return i;
  return std::nullopt;
}

const std::vector<std::string>& drag_model_names() {
  static const std::vector<std::string> names = [] {
    std::vector<std::string> out;
    for (const auto& f : kFacts) out.emplace_back(f.name);
    return out;
  }();
  return names;
}

DragLaws make_drag_law(DragModel model, std::span<const double> values) {
  if (model >= kDragModels || values.size() < kFacts[model].inputs.size())
    throw std::invalid_argument("a drag law needs a value for each of its inputs");
  return make_law(model, values, std::make_index_sequence<kDragModels>{});
}

DragValues drag_values(const DragLaws& law) {
  return std::visit(
      [](const auto& l) {
        DragValues out;
        const auto v = l.values();
        std::copy(v.begin(), v.end(), out.value.begin());
        out.size = v.size();
        return out;
      },
      law);
}

MachTable::MachTable(std::vector<double> mach, std::vector<double> factor)
    : mach_(std::move(mach)), factor_(std::move(factor)) {
  if (mach_.size() != factor_.size() || mach_.empty())
    throw std::invalid_argument("a Mach table needs one factor per Mach number");
  for (std::size_t i = 0; i < mach_.size(); ++i) {
    if (!(std::isfinite(mach_[i]) && mach_[i] >= 0.0))
      throw std::invalid_argument("Mach numbers must be finite and non-negative");
    if (!(std::isfinite(factor_[i]) && factor_[i] > 0.0))
      throw std::invalid_argument("Mach table factors must be finite and positive");
    if (i > 0 && !(mach_[i] > mach_[i - 1]))
      throw std::invalid_argument("Mach numbers must be strictly increasing");
  }
}

double MachTable::at(double mach) const {
  if (mach_.empty()) return 1.0;
  if (mach <= mach_.front()) return factor_.front();
  if (mach >= mach_.back()) return factor_.back();
  const auto upper = std::upper_bound(mach_.begin(), mach_.end(), mach);
  const auto i = static_cast<std::size_t>(upper - mach_.begin());
  const double f = (mach - mach_[i - 1]) / (mach_[i] - mach_[i - 1]);
  return factor_[i - 1] + f * (factor_[i] - factor_[i - 1]);
}

DragLaw::DragLaw(const DragSpec& spec) : spec_(spec) {
  std::visit(
      [&](const auto& law) {
        using Law = std::decay_t<decltype(law)>;
        if constexpr (Law::takes_mach_table) mach_table_ = spec.mach_table;
        area_ = law.reference_area();
        length_ = law.length();
        needs_viscosity_ = Law::needs_viscosity;
        linear_ = Law::linear;
        if constexpr (requires { law.half_cd_area; }) {
          half_cd_area_ = law.half_cd_area;
          constant_cd_ = mach_table_ == nullptr;
        }
      },
      spec.law);
}

double DragLaw::general_coefficient(double speed, const Air& air) const {
  const double k =
      std::visit([&](const auto& law) { return law.coefficient(speed, air); }, spec_.law);
  return mach_table_ ? k * mach_table_->at(speed / air.sound_speed) : k;
}

double DragLaw::cd(double re, double mach) const {
  const double cd = std::visit([&](const auto& law) { return law.cd_at(re); }, spec_.law);
  return mach_table_ ? cd * mach_table_->at(mach) : cd;
}

double DragLaw::quadratic_cd(double re, double mach) const {
  const double cd = std::visit([&](const auto& law) { return law.quadratic_cd(re); }, spec_.law);
  return mach_table_ ? cd * mach_table_->at(mach) : cd;
}

}  // namespace strewn
