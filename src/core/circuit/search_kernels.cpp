#include "circuit/search_kernels.hpp"

#include <cmath>

namespace rtline::kernel {

ScanGrid scan_grid(const Grid& grid) {
    const std::size_t n = grid.size();
    ScanGrid s;
    s.index.reserve(n);
    s.index.push_back(0);
    if (n > 1) s.index.push_back(n - 1);
    // The interior by halving: the middle, the quarters, the eighths, … (odd multiples of (n − 1)/2^L,
    // rounded), then whatever rounding skipped, so every point comes once.
    std::vector<bool> taken(n, false);
    taken[0] = true;
    taken[n - 1] = true;
    for (std::size_t parts = 2; parts < 2 * n; parts *= 2) {
        for (std::size_t k = 1; k < parts; k += 2) {
            const auto i =
                static_cast<std::size_t>(std::lround(static_cast<double>(k * (n - 1)) / static_cast<double>(parts)));
            if (!taken[i]) {
                taken[i] = true;
                s.index.push_back(i);
            }
        }
    }
    for (std::size_t i = 0; i < n; ++i) {
        if (!taken[i]) s.index.push_back(i);
    }
    for (const std::size_t i : s.index) {
        s.t_k.push_back(grid.t_k[i]);
        s.r_ohm.push_back(grid.r_ohm[i]);
    }
    while (s.t_k.size() % kBlock != 0) {
        s.t_k.push_back(grid.t_k[0]);
        s.r_ohm.push_back(grid.r_ohm[0]);
    }
    return s;
}

}  // namespace rtline::kernel
