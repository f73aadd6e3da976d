#pragma once
// Counter-based random numbers: one independent stream per (seed, sample index, purpose), so any
// sample can be replayed alone and results do not depend on which thread or rank draws it.
//
// Generator: Philox4x32-10 of Salmon, Moraes, Dror and Shaw (2011), "Parallel random numbers: as
// easy as 1, 2, 3", SC11, from Debian's Random123. The key holds the seed; the counter holds the
// sample index and the purpose, and Random123's MicroURNG numbers the draws within the stream
// (up to 2^32 blocks of four words each).
// Random123 wants the generator before the adaptor.
// clang-format off
#include <Random123/philox.h>
#include <Random123/MicroURNG.hpp>
// clang-format on
#include <cstdint>

namespace strewn {

/// What a stream is for; inputs use their dimension index (below kFirstNamedPurpose).
namespace purpose {
inline constexpr std::uint32_t kFirstNamedPurpose = 1u << 30;
inline constexpr std::uint32_t latin_permutation =
    kFirstNamedPurpose + 1;  ///< + dimension in the sample word
inline constexpr std::uint32_t sobol_shift = kFirstNamedPurpose + 2;
inline constexpr std::uint32_t canopy = kFirstNamedPurpose + 3;
inline constexpr std::uint32_t burst = kFirstNamedPurpose + 4;
inline constexpr std::uint32_t wind = kFirstNamedPurpose + 5;
}  // namespace purpose

/// One stream. A UniformRandomBitGenerator, so Boost.Random's distributions can draw from it.
class RandomStream {
 public:
  using result_type = std::uint32_t;

  RandomStream(std::uint64_t seed, std::uint64_t sample, std::uint32_t purpose)
      : urng_(counter(sample, purpose), key(seed)) {}

  result_type operator()() { return urng_(); }
  static constexpr result_type min() { return 0; }
  static constexpr result_type max() { return 0xffffffffu; }

  /// A uniform number in the open interval (0, 1) with 53 random bits (two draws): never 0 or 1,
  /// so every inverse distribution function is finite at it.
  double uniform() {
    const std::uint64_t high = (*this)() >> 5;  // 27 bits
    const std::uint64_t low = (*this)() >> 6;   // 26 bits
    return (static_cast<double>((high << 26) | low) + 0.5) * 0x1p-53;
  }

 private:
  using Generator = r123::Philox4x32;
  static Generator::ctr_type counter(std::uint64_t sample, std::uint32_t purpose) {
    // The last word stays 0: MicroURNG counts its draws there.
    return {{static_cast<std::uint32_t>(sample), static_cast<std::uint32_t>(sample >> 32), purpose,
             0u}};
  }
  static Generator::ukey_type key(std::uint64_t seed) {
    return {{static_cast<std::uint32_t>(seed), static_cast<std::uint32_t>(seed >> 32)}};
  }
  r123::MicroURNG<Generator> urng_;
};

}  // namespace strewn
