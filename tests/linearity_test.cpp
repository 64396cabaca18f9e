// The three reference lines and the %FSD nonlinearity: small sets worked by hand, then data of several
// shapes against tests/ref/lines.py (numpy.polyfit; scipy linprog for the minimax line as an LP;
// Bentley's %FSD computed in Python).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <string>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/error.hpp"
#include "rtline/linearity.hpp"
#include "rtline/thermistor.hpp"
#include "support.hpp"

namespace {

using rtline::Line;
using rtline::LineKind;

struct Data {
    std::string shape;
    std::vector<double> x;
    std::vector<double> y;
};

// Our own beta thermistor for the data: R25 = 10 kΩ, B = 3950 K.
const rtline::Thermistor kNtc(rtline::BetaModel{10e3, rtline::k25CelsiusK, 3950.0});

std::vector<Data> shapes() {
    std::vector<Data> d;
    {  // Convex, falling: the bare thermistor's resistance from 0 to 50 °C (x in kelvin).
        Data s{"convex (bare NTC)", {}, {}};
        for (double t = 273.15; t <= 323.15 + 1e-9; t += 2.5) {
            s.x.push_back(t);
            s.y.push_back(kNtc.resistance(t));
        }
        d.push_back(s);
    }
    {  // Concave, rising: sqrt on 0..4.
        Data s{"concave (sqrt)", {}, {}};
        for (int i = 0; i <= 16; ++i) {
            s.x.push_back(0.25 * i);
            s.y.push_back(std::sqrt(0.25 * i));
        }
        d.push_back(s);
    }
    {  // S-shaped: a divider-low with rs = 10 kΩ from -40 to 100 °C (an inflection inside the span).
        rtline::Circuit c;
        c.topology = rtline::Topology::divider_low;
        c.rs = 10e3;
        Data s{"S-shaped (divider-low)", {}, {}};
        for (double t = 233.15; t <= 373.15 + 1e-9; t += 5.0) {
            s.x.push_back(t);
            s.y.push_back(rtline::output(c, kNtc.resistance(t)));
        }
        d.push_back(s);
    }
    {  // Noisy: a line plus ±0.5 mV of seeded noise at unevenly spaced x.
        std::minstd_rand g(20240611);
        Data s{"noisy line", {}, {}};
        double x = 250.0;
        for (int i = 0; i < 40; ++i) {
            x += 1.0 + 2.0 * static_cast<double>(g()) / static_cast<double>(std::minstd_rand::max());
            const double noise = (static_cast<double>(g()) / static_cast<double>(std::minstd_rand::max()) - 0.5) * 1e-3;
            s.x.push_back(x);
            s.y.push_back(0.3 + 0.002 * x + noise);
        }
        d.push_back(s);
    }
    return d;
}

// tests/ref/lines.py's lines for shapes(), computed once.
const nlohmann::json& reference() {
    static const nlohmann::json ref = [] {
        nlohmann::json in;
        for (const Data& s : shapes()) in["sets"].push_back({{"x", s.x}, {"y", s.y}});
        return rtline::test::python_ref("lines.py", in)["sets"];
    }();
    return ref;
}

double max_abs_dev(const Data& s, const Line& l) {
    double worst = 0.0;
    for (std::size_t i = 0; i < s.x.size(); ++i) worst = std::max(worst, std::abs(s.y[i] - l.at(s.x[i])));
    return worst;
}

// Two lines agree when their slopes agree to `rel` and their values at both ends of the data agree to
// `rel` of the full-scale output (comparing intercepts at x = 0, far outside kelvin data, would not).
void check_same_line(const Data& s, const Line& got, const nlohmann::json& want, double rel) {
    const double fs = std::abs(s.y.back() - s.y.front());
    const Line ref{want["slope"].get<double>(), want["intercept"].get<double>()};
    CHECK(std::abs(got.slope - ref.slope) <= rel * std::abs(ref.slope));
    CHECK(std::abs(got.at(s.x.front()) - ref.at(s.x.front())) <= rel * fs);
    CHECK(std::abs(got.at(s.x.back()) - ref.at(s.x.back())) <= rel * fs);
}

// Hand set: y = x² + 1 at x = 0, 1, 2, 3, i.e. y = 1, 2, 5, 10.
const std::vector<double> kHx{0.0, 1.0, 2.0, 3.0};
const std::vector<double> kHy{1.0, 2.0, 5.0, 10.0};

}  // namespace

TEST_CASE("the endpoint line runs through the first and last points (hand: slope 9/3, intercept 1)") {
    const Line l = rtline::endpoint_line(kHx, kHy);
    CHECK(l.slope == doctest::Approx(3.0).epsilon(1e-15));
    CHECK(l.intercept == doctest::Approx(1.0).epsilon(1e-15));
    // Deviations 0, -2, -2, 0 over a full scale of 9: 2/9 × 100 %FSD (Bentley §2.1).
    CHECK(rtline::max_nonlinearity_pct_fsd(kHx, kHy, LineKind::endpoint) ==
          doctest::Approx(200.0 / 9.0).epsilon(1e-14));
}

TEST_CASE("the least-squares line of a small set worked by hand") {
    // Means 1.5 and 4.5; Sxy = 5.25 + 1.25 + 0.25 + 8.25 = 15; Sxx = 2.25 + 0.25 + 0.25 + 2.25 = 5;
    // slope 15/5 = 3, intercept 4.5 − 3·1.5 = 0.
    const Line l = rtline::least_squares_line(kHx, kHy);
    CHECK(l.slope == doctest::Approx(3.0).epsilon(1e-15));
    CHECK(std::abs(l.intercept) < 1e-14);
}

TEST_CASE("the minimax line of a small set worked by hand halves the endpoint line's worst deviation") {
    // y − m·x = 1, 2 − m, 5 − 2m, 10 − 3m; at m = 3 these are 1, −1, −1, 1 (spread 2); m = 2.5 gives
    // 1, −0.5, 0, 2.5 and m = 3.5 gives 1, −1.5, −2, −0.5 (spread 3 each), and the spread is convex in m,
    // so m = 3 with the strip centred at 0: y = 3x, largest deviation 1, i.e. 100/9 %FSD.
    const Line l = rtline::minimax_line(kHx, kHy);
    CHECK(l.slope == doctest::Approx(3.0).epsilon(1e-15));
    CHECK(std::abs(l.intercept) < 1e-14);
    CHECK(rtline::max_nonlinearity_pct_fsd(kHx, kHy, LineKind::minimax) == doctest::Approx(100.0 / 9.0).epsilon(1e-14));
}

TEST_CASE("least_squares_line agrees with numpy.polyfit on convex, concave, S-shaped and noisy data") {
    const std::vector<Data> data = shapes();
    const nlohmann::json& ref = reference();
    for (std::size_t i = 0; i < data.size(); ++i) {
        CAPTURE(data[i].shape);
        // 1e-9: polyfit solves the same least-squares problem by an SVD; both agree to ~1e-13.
        check_same_line(data[i], rtline::least_squares_line(data[i].x, data[i].y), ref[i]["best_fit"], 1e-9);
    }
}

TEST_CASE("minimax_line agrees with the Chebyshev line fit solved as a linear program by scipy linprog") {
    const std::vector<Data> data = shapes();
    const nlohmann::json& ref = reference();
    for (std::size_t i = 0; i < data.size(); ++i) {
        CAPTURE(data[i].shape);
        const Line l = rtline::minimax_line(data[i].x, data[i].y);
        // 1e-9: HiGHS' dual simplex ends on an exact vertex of the LP, solved to ~1e-15 on this data.
        check_same_line(data[i], l, ref[i]["minimax"], 1e-9);
        const double t = ref[i]["minimax"]["max_abs_dev"].get<double>();
        CHECK(max_abs_dev(data[i], l) == doctest::Approx(t).epsilon(1e-9));
    }
}

TEST_CASE("the minimax line's largest positive and negative deviations are equal (equal ripple)") {
    for (const Data& s : shapes()) {
        CAPTURE(s.shape);
        const Line l = rtline::minimax_line(s.x, s.y);
        double above = 0.0;
        double below = 0.0;
        for (std::size_t i = 0; i < s.x.size(); ++i) {
            above = std::max(above, s.y[i] - l.at(s.x[i]));
            below = std::max(below, l.at(s.x[i]) - s.y[i]);
        }
        CHECK(above > 0.0);
        CHECK(std::abs(above - below) <= 1e-12 * above);
    }
}

TEST_CASE("the minimax line's largest deviation is no larger than the endpoint or best-fit line's") {
    for (const Data& s : shapes()) {
        CAPTURE(s.shape);
        const double mm = max_abs_dev(s, rtline::minimax_line(s.x, s.y));
        CHECK(mm <= max_abs_dev(s, rtline::endpoint_line(s.x, s.y)) * (1.0 + 1e-12));
        CHECK(mm <= max_abs_dev(s, rtline::least_squares_line(s.x, s.y)) * (1.0 + 1e-12));
    }
}

TEST_CASE("max_nonlinearity_pct_fsd follows Bentley's %FSD for each line, computed independently in Python") {
    const std::vector<Data> data = shapes();
    const nlohmann::json& ref = reference();
    const std::pair<LineKind, const char*> kinds[] = {
        {LineKind::endpoint, "endpoint"}, {LineKind::best_fit, "best_fit"}, {LineKind::minimax, "minimax"}};
    for (std::size_t i = 0; i < data.size(); ++i) {
        for (const auto& entry : kinds) {
            const LineKind kind = entry.first;
            const char* const key = entry.second;
            CAPTURE(data[i].shape);
            CAPTURE(key);
            const double want = ref[i][key]["pct_fsd"].get<double>();
            CHECK(rtline::max_nonlinearity_pct_fsd(data[i].x, data[i].y, kind) == doctest::Approx(want).epsilon(1e-9));
        }
        // The endpoint line itself, Bentley's K and a, against ours.
        check_same_line(data[i], rtline::endpoint_line(data[i].x, data[i].y), ref[i]["endpoint"], 1e-12);
    }
}

TEST_CASE("reference_line returns the line of the kind asked for") {
    const Data s = shapes()[2];
    const Line e = rtline::reference_line(s.x, s.y, LineKind::endpoint);
    const Line b = rtline::reference_line(s.x, s.y, LineKind::best_fit);
    const Line m = rtline::reference_line(s.x, s.y, LineKind::minimax);
    CHECK(e.slope == rtline::endpoint_line(s.x, s.y).slope);
    CHECK(b.slope == rtline::least_squares_line(s.x, s.y).slope);
    CHECK(m.slope == rtline::minimax_line(s.x, s.y).slope);
    CHECK(e.slope != b.slope);  // on S-shaped data the three lines differ
    CHECK(b.slope != m.slope);
}

TEST_CASE("on two points or on collinear points all three lines are the data's own line, 0 %FSD") {
    const std::vector<double> x{273.15, 290.0, 310.5, 323.15};
    std::vector<double> y;
    for (const double xi : x) y.push_back(0.25 - 0.004 * xi);  // a straight line, common practice test data
    for (const LineKind k : {LineKind::endpoint, LineKind::best_fit, LineKind::minimax}) {
        const Line l = rtline::reference_line(x, y, k);
        CHECK(l.slope == doctest::Approx(-0.004).epsilon(1e-12));
        CHECK(rtline::max_nonlinearity_pct_fsd(x, y, k) < 1e-10);
        const std::vector<double> x2{x.front(), x.back()};
        const std::vector<double> y2{y.front(), y.back()};
        CHECK(rtline::reference_line(x2, y2, k).slope == doctest::Approx(-0.004).epsilon(1e-12));
    }
}

TEST_CASE("a zero full-scale output gives an infinite nonlinearity, never a division by zero") {
    const std::vector<double> x{1.0, 2.0, 3.0};
    const std::vector<double> y{0.5, 0.7, 0.5};
    CHECK(rtline::full_scale(y) == 0.0);
    CHECK(std::isinf(rtline::max_nonlinearity_pct_fsd(x, y, LineKind::endpoint)));
}

TEST_CASE("line names parse back to their kinds; an unknown name is an InputError naming the flag") {
    for (const LineKind k : {LineKind::endpoint, LineKind::best_fit, LineKind::minimax}) {
        CHECK(rtline::parse_line(rtline::line_name(k), "--line") == k);
    }
    CHECK(rtline::line_name(LineKind::best_fit) == "least-squares");
    for (const char* bad : {"least-squares", "Endpoint", "", "independent"}) {
        CAPTURE(bad);
        try {
            (void)rtline::parse_line(bad, "--line");
            FAIL("no error for an unknown line");
        } catch (const rtline::InputError& e) {
            CHECK(e.field() == "--line");
            CHECK(e.value() == bad);
        }
    }
}
