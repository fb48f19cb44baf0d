// src/sweep.h — the Monte-Carlo seeding of sweep cases (internal).
#ifndef OVERTONE_INTERNAL_SWEEP_H_
#define OVERTONE_INTERNAL_SWEEP_H_

#include <cstdint>

namespace overtone::internal {

// A well-mixed 64-bit number from a seed and a case index (SplitMix64 finaliser), so each
// Monte-Carlo case has its own stream whatever shard or thread runs it.
std::uint64_t CaseSeed(std::uint64_t seed, std::uint64_t index);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_SWEEP_H_
