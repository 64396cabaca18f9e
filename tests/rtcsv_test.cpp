// Reading R–T points from CSV text: accepted layouts and every rejected input with the line and column
// it names. The points are our own round numbers for a 10 kΩ-class NTC (a freezer room's sensor), not
// a datasheet table; the conversions checked are T/K = t/°C + 273.15 (SI brochure) and 1 kΩ = 1000 Ω.
#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "rtline/error.hpp"
#include "rtline/rtcsv.hpp"

using namespace rtline;

namespace {

// The message read_rt_points throws for `text`, or "" when it accepts it.
std::string error_of(const std::string& text) {
    try {
        (void)read_rt_points(text, "room.csv");
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

// The two points 0 °C → 32.6 kΩ and 25 °C → 10 kΩ, whatever the layout they were read from.
void check_two_points(const std::vector<RtPoint>& pts) {
    REQUIRE(pts.size() == 2);
    CHECK(pts[0].t_k == doctest::Approx(273.15).epsilon(1e-14));  // 0 °C
    CHECK(pts[0].r_ohm == doctest::Approx(32.6e3).epsilon(1e-14));
    CHECK(pts[1].t_k == doctest::Approx(298.15).epsilon(1e-14));  // 25 °C
    CHECK(pts[1].r_ohm == doctest::Approx(10e3).epsilon(1e-14));
}

}  // namespace

TEST_CASE("the CSV layouts an engineer writes are all read as the same points") {
    struct Case {
        const char* what;
        std::string text;
    };
    const Case cases[] = {
        {"header t_c,r_ohm", "t_c,r_ohm\n0,32600\n25,10000\n"},
        {"no final newline", "t_c,r_ohm\n0,32600\n25,10000"},
        {"kelvin column t_k", "t_k,r_ohm\n273.15,32600\n298.15,10000\n"},
        {"kilohm column r_kohm", "t_c,r_kohm\n0,32.6\n25,10\n"},
        {"columns in the other order", "r_ohm,t_c\n32600,0\n10000,25\n"},
        {"whitespace-separated", "t_c r_ohm\n0   32600\n25\t10000\n"},
        {"tab-separated header", "t_c\tr_ohm\n0\t32600\n25\t10000\n"},
        {"blanks around commas", "t_c , r_ohm\n 0 , 32600 \n25,  10000\n"},
        {"comments and blank lines",
         "# freezer room sensor\n\nt_c,r_ohm  # header\n0,32600 # at 0\n\n25,10000\n#end\n"},
        {"CRLF line ends", "t_c,r_ohm\r\n0,32600\r\n25,10000\r\n"},
        {"UTF-8 byte-order mark", "\xEF\xBB\xBFt_c,r_ohm\n0,32600\n25,10000\n"},
        {"headerless two columns", "0,32600\n25,10000\n"},
        {"headerless whitespace", "0 32600\n25 10000\n"},
        {"letter-code resistances", "t_c,r_ohm\n0,32k6\n25,10k\n"},
        {"rows in any temperature order", "t_c,r_ohm\n25,10000\n0,32600\n"},
        {"exponent form", "t_c,r_ohm\n0e0,3.26e4\n2.5e1,1e4\n"},
    };
    for (const Case& c : cases) {
        INFO(c.what);
        check_two_points(read_rt_points(c.text, "room.csv"));
    }
}

TEST_CASE("a negative Celsius temperature and a sub-kilohm letter code are read as typed") {
    // -40 °C = 233.15 K; 680R = 680 Ω and 1k2 = 1200 Ω in the IEC 60062 letter code (from memory).
    const auto pts = read_rt_points("t_c,r_ohm\n-40,336k\n80,1k2\n100,680R\n", "room.csv");
    REQUIRE(pts.size() == 3);
    CHECK(pts[0].t_k == doctest::Approx(233.15).epsilon(1e-14));
    CHECK(pts[0].r_ohm == doctest::Approx(336e3).epsilon(1e-14));
    CHECK(pts[1].r_ohm == doctest::Approx(1200.0).epsilon(1e-14));
    CHECK(pts[2].r_ohm == doctest::Approx(680.0).epsilon(1e-14));
}

TEST_CASE("each malformed value is rejected with its file, line and column") {
    struct Case {
        const char* what;
        std::string text;
        const char* message;
    };
    const Case cases[] = {
        {"zero resistance", "t_c,r_ohm\n0,32600\n25,0\n", "room.csv:3:2 '0': a resistance must be positive"},
        {"negative resistance", "t_c,r_ohm\n0,-5\n", "room.csv:2:2 '-5': a resistance must be positive"},
        {"negative kilohms", "t_c,r_kohm\n0,-1\n", "room.csv:2:2 '-1': a resistance must be positive"},
        {"resistance column first", "r_ohm,t_c\n32600,0\n-1,25\n", "room.csv:3:1 '-1': a resistance must be positive"},
        {"absolute zero in degC", "t_c,r_ohm\n-273.15,5e9\n",
         "room.csv:2:1 '-273.15': is at or below absolute zero (-273.15 C)"},
        {"colder than absolute zero", "t_c,r_ohm\n0,32600\n-300,5e9\n",
         "room.csv:3:1 '-300': is at or below absolute zero (-273.15 C)"},
        {"zero kelvin", "t_k,r_ohm\n0,5e9\n", "room.csv:2:1 '0': is at or below absolute zero (-273.15 C)"},
        // Just past the ends of an R-T point's range, 1 mK to 10 000 K (kMinPointK, kMaxPointK: our own
        // limits; 9727 C is 10000.15 K).
        {"below 1 mK", "t_k,r_ohm\n0.0009,5e9\n",
         "room.csv:2:1 '0.0009': is outside the range of an R-T point, 0.001 to 10000 K (a typing mistake?)"},
        {"above 10000 K", "t_c,r_ohm\n0,32600\n9727,1\n",
         "room.csv:3:1 '9727': is outside the range of an R-T point, 0.001 to 10000 K (a typing mistake?)"},
        {"temperature not a number", "t_c,r_ohm\nwarm,32600\n",
         "room.csv:2:1 'warm': expected a temperature (a plain number)"},
        {"temperature with a unit", "t_c,r_ohm\n25C,10000\n",
         "room.csv:2:1 '25C': expected a temperature (a plain number)"},
        {"resistance not a value", "t_c,r_ohm\n0,lots\n",
         "room.csv:2:2 'lots': expected a resistance such as 470, 4k7, 10k or 1M5"},
        {"empty resistance field", "t_c,r_ohm\n0,\n",
         "room.csv:2:2: expected a resistance such as 470, 4k7, 10k or 1M5"},
        {"kilohms that overflow", "t_c,r_kohm\n0,1e306\n", "room.csv:2:2 '1e306': too large for a resistance"},
    };
    for (const Case& c : cases) {
        INFO(c.what);
        CHECK(error_of(c.text) == c.message);
    }
}

TEST_CASE("an R-T point exactly at either end of the allowed range is read") {
    // 0.001 K and 10000 K are kMinPointK and kMaxPointK themselves (our own limits).
    const std::vector<RtPoint> pts = read_rt_points("t_k,r_ohm\n0.001,1e9\n10000,1\n", "room.csv");
    REQUIRE(pts.size() == 2);
    CHECK(pts[0].t_k == 0.001);
    CHECK(pts[1].t_k == 10000.0);
}

TEST_CASE("a duplicate temperature is rejected at its later line, naming the earlier one") {
    CHECK(error_of("t_c,r_ohm\n0,32600\n25,10000\n0,31000\n") ==
          "room.csv:4:1 '0 C': duplicate temperature (also on line 2)");
    // The same temperature written in two ways is still a duplicate: 25 and 2.5e1.
    CHECK(error_of("t_c,r_ohm\n25,10000\n2.5e1,9000\n") ==
          "room.csv:3:1 '25 C': duplicate temperature (also on line 2)");
}

TEST_CASE("a resistance that does not fall with temperature is rejected at its line and column") {
    // An NTC's resistance falls strictly as temperature rises (IEC 60539-1 defines the NTC, from memory).
    CHECK(error_of("t_c,r_ohm\n0,32600\n25,32600\n") ==
          "room.csv:3:2 '32600 ohm': the resistance at 25 C does not fall below that at 0 C (line 2); an "
          "NTC's must fall strictly");
    CHECK(error_of("r_ohm,t_c\n10000,25\n12000,50\n") ==
          "room.csv:3:1 '12000 ohm': the resistance at 50 C does not fall below that at 25 C (line 2); an "
          "NTC's must fall strictly");
}

TEST_CASE("a row with the wrong number of fields names its line and the first extra or missing field") {
    CHECK(error_of("t_c,r_ohm\n0,32600,5\n") == "room.csv:2:3 '0,32600,5': expected 2 fields, found 3");
    CHECK(error_of("t_c,r_ohm\n0,32600\n25\n") == "room.csv:3:2 '25': expected 2 fields, found 1");
    CHECK(error_of("0 32600\n25 10000 3\n") == "room.csv:2:3 '25 10000 3': expected 2 fields, found 3");
}

TEST_CASE("an unknown or repeated column in the header is rejected at its column") {
    struct Case {
        std::string text;
        const char* message;
    };
    const Case cases[] = {
        {"t_c,resistance\n0,32600\n",
         "room.csv:1:2 'resistance': unknown column; the header names t_c or t_k and r_ohm or r_kohm"},
        {"t_c,r_ohm,note\n0,32600,x\n",
         "room.csv:1:3 'note': unknown column; the header names t_c or t_k and r_ohm or r_kohm"},
        {"T_C,R_OHM\n0,32600\n", "room.csv:1:1 'T_C': unknown column; the header names t_c or t_k and r_ohm or r_kohm"},
        {"t_c,t_k,r_ohm\n0,273.15,32600\n", "room.csv:1:2 't_k': a second temperature column"},
        {"t_c,r_ohm,r_kohm\n0,32600,32.6\n", "room.csv:1:3 'r_kohm': a second resistance column"},
        {"t_c\n0\n",
         "room.csv:1 't_c': the header must name a temperature (t_c or t_k) and a resistance (r_ohm or r_kohm) column"},
    };
    for (const Case& c : cases) {
        INFO(c.text);
        CHECK(error_of(c.text) == c.message);
    }
}

TEST_CASE("a file with no points is rejected naming the file") {
    // No line to name: the whole file is at fault.
    for (const std::string text : {"", "\n\n", "# only a comment\n", "t_c,r_ohm\n", "\xEF\xBB\xBF", "\r\n\r\n"}) {
        INFO("text: '" << text << "'");
        CHECK(error_of(text) == "room.csv: contains no R-T points");
    }
}

TEST_CASE("a binary file is rejected at the line of its first NUL byte") {
    const std::string text("t_c,r_ohm\n0,32600\n25,1\0\0\n", 25);
    CHECK(error_of(text) == "room.csv:3: is not a text file (a NUL byte at byte 5 of the line)");
    CHECK(error_of(std::string("\0PK", 3)) == "room.csv:1: is not a text file (a NUL byte at byte 1 of the line)");
}

TEST_CASE("validate_points rejects a file with fewer points than the model needs") {
    // Steinhart–Hart needs three points (three coefficients), the beta model two, the table two.
    const auto one = read_rt_points("t_c,r_ohm\n25,10000\n", "room.csv");
    const auto two = read_rt_points("t_c,r_ohm\n0,32600\n25,10000\n", "room.csv");
    CHECK_THROWS_WITH_AS((void)validate_points(two, 3, "room.csv"),
                         "room.csv '2 points': this model needs at least 3 R-T points", InputError);
    CHECK_THROWS_WITH_AS((void)validate_points(one, 2, "room.csv"),
                         "room.csv '1 point': this model needs at least 2 R-T points", InputError);
    CHECK(validate_points(two, 2, "room.csv").size() == 2);
}
