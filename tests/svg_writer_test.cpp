// The SVG writer on its own: 1-2-5 ticks, log ticks and tick labels by hand, XML escaping, and
// pictures read back with Python's XML parser (well-formed, self-contained, extremes kept when thinned).
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "svg_reading.hpp"

using namespace rtline::test::svgread;  // NOLINT(google-build-using-namespace): the test helpers

TEST_CASE("nice_step picks 1, 2 or 5 times a power of ten near range/target") {
    struct Case {
        double lo, hi;
        int target;
        double step;
    };
    // By hand: raw = (hi − lo)/target; its mantissa r in [1, 10) rounds to 1 below 1.5, 2 below 3.5,
    // 5 below 7.5, else 10.
    const Case cases[] = {
        {0.0, 45.0, 8, 5.0},          // raw 5.625 -> 5
        {0.0, 1.0, 4, 0.2},           // raw 0.25 -> mantissa 2.5 -> 2
        {-0.0402, 0.0402, 5, 0.02},   // raw 0.01608 -> mantissa 1.608 -> 2
        {1242.0, 3156.0, 10, 200.0},  // raw 191.4 -> mantissa 1.914 -> 2
        {0.0, 7.0, 1, 5.0},           // raw 7 -> 5
        {0.0, 8.0, 1, 10.0},          // raw 8 -> 10
        {0.0, 1.4, 1, 1.0},           // raw 1.4 -> 1
    };
    for (const Case& c : cases) {
        CAPTURE(c.lo);
        CAPTURE(c.hi);
        CHECK(svg::nice_step(c.lo, c.hi, c.target) == doctest::Approx(c.step).epsilon(1e-12));
    }
}

TEST_CASE("nice_ticks are the step's multiples inside the range, with an exact zero") {
    CHECK(svg::nice_ticks(1242.0, 3156.0, 10) ==
          std::vector<double>{1400, 1600, 1800, 2000, 2200, 2400, 2600, 2800, 3000});  // step 200, 3200 > 3156
    const std::vector<double> t = svg::nice_ticks(-0.0402, 0.0402, 5);
    REQUIRE(t.size() == 5);  // −0.04 … 0.04 in steps of 0.02
    CHECK(t[0] == doctest::Approx(-0.04));
    CHECK(t[2] == 0.0);
    CHECK(std::signbit(t[2]) == false);
    CHECK(t[4] == doctest::Approx(0.04));
    CHECK(svg::nice_ticks(0.0, 45.0, 8).size() == 10);  // 0, 5, …, 45: both ends are ticks
}

TEST_CASE("log_ticks are the chosen mantissas times powers of ten inside the range") {
    CHECK(svg::log_ticks(2140.0, 34200.0, {1, 2, 5}) == std::vector<double>{5000, 10000, 20000});
    CHECK(svg::log_ticks(2140.0, 34200.0, {1, 2, 3, 5}) == std::vector<double>{3000, 5000, 10000, 20000, 30000});
    CHECK(svg::log_ticks(1e-3, 1.0, {1}) == std::vector<double>{0.001, 0.01, 0.1, 1.0});
    CHECK(svg::log_ticks(6.0, 9.0, {1, 2, 5}).empty());  // none inside: the caller falls back to linear ticks
}

TEST_CASE("tick labels: decimals from the step, a real minus sign, SI prefixes, whole codes, the letter code") {
    struct Case {
        double v, step;
        svg::Ticks kind;
        const char* label;
    };
    const Case cases[] = {
        {-0.02, 0.02, svg::Ticks::number,
         "\xE2\x88\x92"
         "0.02"},
        {1e-18, 0.02, svg::Ticks::number, "0.00"},  // rounding noise at zero prints as zero, unsigned
        {45.0, 5.0, svg::Ticks::number, "45"},
        {2.5, 0.5, svg::Ticks::number, "2.5"},
        {1.5e6, 5e5, svg::Ticks::number, "1.5M"},
        {2e-5, 1e-5, svg::Ticks::number, "20\xC2\xB5"},
        {3156.0, 1.0, svg::Ticks::whole, "3156"},
        {20000.0, 20000.0, svg::Ticks::resistance, "20k"},
        {4700.0, 100.0, svg::Ticks::resistance, "4k7"},
        {5e5, 5e5, svg::Ticks::number, "500k"},
        {0.0, 1e6, svg::Ticks::number, "0"},  // no prefix on zero
        {1e6, 1e6, svg::Ticks::resistance, "1M"},
    };
    for (const Case& c : cases) {
        CAPTURE(c.v);
        CHECK(svg::tick_label(c.v, c.step, c.kind) == c.label);
    }
}

TEST_CASE("escape makes the five XML specials and control characters safe") {
    CHECK(svg::escape("a<b & \"c\" 'd' >") == "a&lt;b &amp; &quot;c&quot; &apos;d&apos; &gt;");
    CHECK(svg::escape(std::string("bell\x07", 5)) == "bell ");
    CHECK(svg::escape("10 k\xCE\xA9, 25 \xC2\xB0"
                      "C") ==
          "10 k\xCE\xA9, 25 \xC2\xB0"
          "C");  // UTF-8 passes
}

TEST_CASE("a picture with XML specials in every text parses as XML and keeps the text") {
    svg::Figure f;
    f.title = "R < 10k & \"B\" > 3000 'K'";
    f.notes = {"note <b>not bold</b>"};
    svg::Plot p;
    p.title = "a & b";
    p.x.label = "x <unit>";
    p.y.label = "y & z";
    p.lines.push_back({"line \"one\" <&>", {0, 1, 2}, {0, 1, 4}});
    p.markers.push_back({"mark 'here'", {1}, {1}});
    f.plots.push_back(p);
    const TempPath path(".svg");
    write_file(path.str(), svg::render(f));
    const Json s = read_svg(path.str());
    CHECK(s["title"] == f.title);
    CHECK(has_text(s["texts"], "note <b>not bold</b>"));
    CHECK(s["plots"][0]["x_label"] == "x <unit>");
    CHECK(s["plots"][0]["series"][0]["label"] == "line \"one\" <&>");
    CHECK(s["plots"][0]["legend"][0] == "line \"one\" <&>");
    CHECK(s["scripts"] == 0);
    CHECK(s["links"] == 0);
}

TEST_CASE("a line of 20001 points is thinned per pixel column and keeps its extremes") {
    svg::Figure f;
    svg::Plot p;
    p.x = svg::Axis{"sample", svg::Scale::linear, svg::Ticks::whole};
    p.y = svg::Axis{"value", svg::Scale::linear, svg::Ticks::number};
    std::vector<double> x;
    std::vector<double> y;
    for (int i = 0; i <= 20000; ++i) {
        x.push_back(i);
        y.push_back(std::sin(i * 0.01));
    }
    y[12345] = 5.0;  // one spike up and one down, each a single point
    y[777] = -3.0;
    p.lines.push_back({"wiggle", x, y});
    f.plots.push_back(p);
    const TempPath path(".svg");
    const std::string text = svg::render(f);
    write_file(path.str(), text);
    const Json s = read_svg(path.str());
    const Json& plot = s["plots"][0];
    const auto v = vertices(series(plot, "wiggle"));
    CHECK(v.size() < svg::kMaxVertices);
    CHECK(v.size() <= 2 * static_cast<std::size_t>(plot["area"]["w"].get<double>() + 2));  // two per pixel column
    const AxisMap ym = axis_map(plot["y_ticks"]);
    double top = 1e300;
    double bottom = -1e300;
    for (const auto& p2 : v) {
        top = std::min(top, p2[1]);
        bottom = std::max(bottom, p2[1]);
    }
    const double range = 8.0;  // the data run from −3 to 5
    CHECK(ym.value(top) == doctest::Approx(5.0).epsilon(kReadBack * range / 5.0));
    CHECK(ym.value(bottom) == doctest::Approx(-3.0).epsilon(kReadBack * range / 3.0));
    CHECK(text.find("20001 points drawn as") != std::string::npos);  // the <desc> says it was thinned
}
