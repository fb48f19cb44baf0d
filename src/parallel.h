// src/parallel.h — hand independent work items to a few threads (internal).
#ifndef OVERTONE_INTERNAL_PARALLEL_H_
#define OVERTONE_INTERNAL_PARALLEL_H_

#include <algorithm>
#include <atomic>
#include <exception>
#include <mutex>
#include <thread>
#include <vector>

namespace overtone::internal {

// `requested` threads (0 = all cores), at most one per item and at least one.
inline int ResolveThreads(int requested, int items) {
  int threads = requested > 0 ? requested : static_cast<int>(std::thread::hardware_concurrency());
  return std::clamp(threads, 1, std::max(1, items));
}

// Calls body(state, i) for every i in [0, count). Each thread first makes its own state with
// make_state() (e.g. a numeric factorization); items are handed out one at a time, so which
// thread takes an item must not change its result. The first exception stops the others and is
// rethrown here.
template <typename MakeState, typename Body>
void ParallelFor(int count, int threads, MakeState make_state, Body body) {
  std::atomic<int> next{0};
  std::exception_ptr failure;
  std::mutex failure_mutex;
  auto work = [&]() {
    try {
      auto state = make_state();
      for (int i = next++; i < count; i = next++) body(*state, i);
    } catch (...) {
      std::lock_guard lock(failure_mutex);
      if (!failure) failure = std::current_exception();
      next = count;
    }
  };
  std::vector<std::thread> pool;
  for (int t = 1; t < ResolveThreads(threads, count); ++t) pool.emplace_back(work);
  work();
  for (std::thread& t : pool) t.join();
  if (failure) std::rethrow_exception(failure);
}

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_PARALLEL_H_
