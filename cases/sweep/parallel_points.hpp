#pragma once
// Work spread over the OpenMP threads, one item at a time, without letting an
// exception escape the parallel region (which would end the process): the first
// failure stops the other threads from starting new items and is rethrown once
// all have returned. A stop request (stop_request.hpp) also stops new items.
#include "cases/output/stop_request.hpp"

#include <atomic>
#include <cstddef>
#include <exception>
#include <mutex>

namespace murk {

template <class Body>
void for_each_in_parallel(std::size_t count, Body body) {
    std::exception_ptr failure;
    std::mutex failure_mutex;
    std::atomic<bool> failed{false};
#pragma omp parallel for schedule(dynamic, 1)
    for (std::ptrdiff_t i = 0; i < std::ptrdiff_t(count); ++i) {
        if (stop_requested() || failed) continue;
        try {
            body(static_cast<std::size_t>(i));
        } catch (...) {
            std::lock_guard<std::mutex> lock(failure_mutex);
            if (!failure) failure = std::current_exception();
            failed = true;
        }
    }
    if (failure) std::rethrow_exception(failure);
}

}  // namespace murk
