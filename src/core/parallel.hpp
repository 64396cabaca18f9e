// Work split over threads (internal to the core): a loop whose iterations are independent runs on a few
// std::threads that take the next index as they become free. Callers keep per-worker state and merge it
// in an order that does not depend on which worker did what, so results never depend on the thread count.
#pragma once

#include <algorithm>
#include <atomic>
#include <cstddef>
#include <exception>
#include <mutex>
#include <thread>
#include <vector>

namespace rtline::detail {

// Worker threads for `tasks` independent tasks of `work` units in all (points evaluated, say): as many as
// `requested` (0: one per core) and no more than the tasks, but one when the whole job is too small to
// repay starting threads (about 50 µs each against some 2 ns a unit).
[[nodiscard]] inline std::size_t worker_count(std::size_t requested, std::size_t tasks, double work) {
    constexpr double kMinWorkPerThread = 250'000.0;
    std::size_t n = requested != 0 ? requested : std::max(1u, std::thread::hardware_concurrency());
    n = std::min(n, std::max<std::size_t>(tasks, 1));
    while (n > 1 && work / static_cast<double>(n) < kMinWorkPerThread) --n;
    return n;
}

// Calls body(worker, i) for every i in [0, tasks), on `workers` threads (this one among them); worker
// is in [0, workers). The first exception a body throws is rethrown here once all threads have stopped.
template <class Body>
void parallel_for(std::size_t tasks, std::size_t workers, Body&& body) {
    if (workers <= 1) {
        for (std::size_t i = 0; i < tasks; ++i) body(std::size_t{0}, i);
        return;
    }
    std::atomic<std::size_t> next{0};
    std::exception_ptr error;
    std::mutex error_mutex;
    auto run = [&](std::size_t worker) {
        try {
            for (std::size_t i = next++; i < tasks; i = next++) body(worker, i);
        } catch (...) {
            const std::lock_guard<std::mutex> lock(error_mutex);
            if (!error) error = std::current_exception();
            next = tasks;
        }
    };
    std::vector<std::thread> threads;
    threads.reserve(workers - 1);
    for (std::size_t w = 1; w < workers; ++w) threads.emplace_back(run, w);
    run(0);
    for (std::thread& t : threads) t.join();
    if (error) std::rethrow_exception(error);
}

}  // namespace rtline::detail
