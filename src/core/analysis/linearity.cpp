#include "rtline/linearity.hpp"

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "rtline/error.hpp"

namespace rtline {

std::string_view line_name(LineKind k) {
    switch (k) {
        case LineKind::endpoint: return "endpoint";
        case LineKind::best_fit: return "least-squares";
        case LineKind::minimax: return "minimax";
    }
    return "?";
}

LineKind parse_line(std::string_view text, std::string_view field) {
    if (text == "endpoint") return LineKind::endpoint;
    // "best-fit" is the line's earlier name, still read so that old scripts and spec files keep working.
    if (text == "least-squares" || text == "best-fit") return LineKind::best_fit;
    if (text == "minimax") return LineKind::minimax;
    throw InputError(std::string(field), std::string(text), "unknown line; choose endpoint, least-squares or minimax");
}

Line endpoint_line(std::span<const double> x, std::span<const double> y) {
    const std::size_t n = x.size();
    const double slope = (y[n - 1] - y[0]) / (x[n - 1] - x[0]);
    return {slope, y[0] - slope * x[0]};
}

Line least_squares_line(std::span<const double> x, std::span<const double> y) {
    const std::size_t n = x.size();
    double mx = 0.0;
    double my = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
        mx += x[i];
        my += y[i];
    }
    mx /= static_cast<double>(n);
    my /= static_cast<double>(n);
    double sxy = 0.0;
    double sxx = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
        sxy += (x[i] - mx) * (y[i] - my);
        sxx += (x[i] - mx) * (x[i] - mx);
    }
    const double slope = sxy / sxx;
    return {slope, my - slope * mx};
}

namespace {

// max(y − m·x) − min(y − m·x), and the two extremes.
struct Strip {
    double width;
    double top;
    double bottom;
};

Strip strip(std::span<const double> x, std::span<const double> y, double m) {
    double top = -INFINITY;
    double bottom = INFINITY;
    for (std::size_t i = 0; i < x.size(); ++i) {
        const double r = y[i] - m * x[i];
        top = std::max(top, r);
        bottom = std::min(bottom, r);
    }
    return {top - bottom, top, bottom};
}

double cross(double ox, double oy, double ax, double ay, double bx, double by) {
    return (ax - ox) * (by - oy) - (ay - oy) * (bx - ox);
}

// Slopes of the edges of the upper or lower convex hull (x ascending; Andrew's monotone chain).
void hull_slopes(std::span<const double> x, std::span<const double> y, bool upper, std::vector<double>& out) {
    std::vector<std::size_t> h;
    for (std::size_t i = 0; i < x.size(); ++i) {
        while (h.size() >= 2) {
            const std::size_t a = h[h.size() - 2];
            const std::size_t b = h[h.size() - 1];
            const double c = cross(x[a], y[a], x[b], y[b], x[i], y[i]);
            if ((upper && c >= 0.0) || (!upper && c <= 0.0)) {
                h.pop_back();
            } else {
                break;
            }
        }
        h.push_back(i);
    }
    for (std::size_t k = 1; k < h.size(); ++k) {
        out.push_back((y[h[k]] - y[h[k - 1]]) / (x[h[k]] - x[h[k - 1]]));
    }
}

}  // namespace

Line minimax_line(std::span<const double> x, std::span<const double> y) {
    std::vector<double> slopes;
    slopes.reserve(2 * x.size());
    hull_slopes(x, y, true, slopes);
    hull_slopes(x, y, false, slopes);
    std::sort(slopes.begin(), slopes.end());
    slopes.erase(std::unique(slopes.begin(), slopes.end()), slopes.end());
    // The spread is convex in m and its minimum sits at one of these slopes: binary search on the
    // sign of its change between neighbours.
    std::size_t lo = 0;
    std::size_t hi = slopes.size() - 1;
    while (lo < hi) {
        const std::size_t mid = lo + (hi - lo) / 2;
        if (strip(x, y, slopes[mid]).width <= strip(x, y, slopes[mid + 1]).width) {
            hi = mid;
        } else {
            lo = mid + 1;
        }
    }
    const double m = slopes[lo];
    const Strip s = strip(x, y, m);
    return {m, 0.5 * (s.top + s.bottom)};
}

Line reference_line(std::span<const double> x, std::span<const double> y, LineKind k) {
    switch (k) {
        case LineKind::endpoint: return endpoint_line(x, y);
        case LineKind::best_fit: return least_squares_line(x, y);
        case LineKind::minimax: return minimax_line(x, y);
    }
    return {};
}

}  // namespace rtline

namespace rtline {

double full_scale(std::span<const double> y) { return std::abs(y[y.size() - 1] - y[0]); }

double max_nonlinearity_pct_fsd(std::span<const double> x, std::span<const double> y, LineKind k) {
    const double fs = full_scale(y);
    if (!(fs > 0.0) || !std::isfinite(fs)) return INFINITY;
    const Line line = reference_line(x, y, k);
    double worst = 0.0;
    for (std::size_t i = 0; i < x.size(); ++i) worst = std::max(worst, std::abs(y[i] - line.at(x[i])));
    return worst / fs * 100.0;
}

}  // namespace rtline
