// The catalogue of malformed input: every command refuses a mistyped value, a broken R–T
// file, a broken spec file or a broken JSON Lines batch with exit code 2, exactly one line on stderr
// naming the flag or field and the offending value, and nothing on stdout. The messages are checked
// whole: they are what an engineer reads. Files are given on stdin ('-'), so they are named "stdin".
#include <doctest/doctest.h>

#include <algorithm>
#include <string>
#include <vector>

#include "rtline/units.hpp"
#include "support.hpp"

using nlohmann::json;
using rtline::test::python_ref;
using rtline::test::run_rtline;

namespace {

struct BadInput {
    const char* mistake;            // what the user got wrong
    std::vector<std::string> args;  // the command line
    std::string message;            // stderr without the "rtline: " prefix and the newline
    std::string input = "";         // stdin (an R–T file or a spec)
};

std::string joined(const std::vector<std::string>& args) {
    std::string s;
    for (const std::string& a : args) s += " " + a;
    return s;
}

void check_refused(const std::vector<BadInput>& cases) {
    for (const BadInput& c : cases) {
        INFO(c.mistake << ": rtline" << joined(c.args));
        const auto r = run_rtline(c.args, c.input);
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
        CHECK(r.err == "rtline: " + c.message + "\n");
    }
}

// A case a real part could have: the run goes on, with exactly this one warning on stderr.
void check_warned(const std::vector<BadInput>& cases) {
    for (const BadInput& c : cases) {
        INFO(c.mistake << ": rtline" << joined(c.args));
        const auto r = run_rtline(c.args, c.input);
        CHECK(r.code == 0);
        CHECK(!r.out.empty());
        CHECK(r.err == "rtline: warning: " + c.message + "\n");
    }
}

// A command line with the flags common to a case spliced in.
std::vector<std::string> with(std::vector<std::string> base, const std::vector<std::string>& more) {
    base.insert(base.end(), more.begin(), more.end());
    return base;
}

const std::vector<std::string> kModel = {"model", "--r25", "10k", "--beta", "3950"};
const std::vector<std::string> kCheck = {"check", "--r25", "10k", "--beta", "3950", "--span", "0:50", "--circuit"};
const std::vector<std::string> kTable = {"table", "--r25",     "10k",         "--beta", "3950", "--span",
                                         "0:45",  "--circuit", "divider-low", "--rs",   "10k"};
const std::vector<std::string> kBudget = {"budget", "--r25",     "10k",         "--beta", "3950", "--span",
                                          "0:50",   "--circuit", "divider-low", "--rs",   "10k"};
const std::vector<std::string> kSize = {"size",   "--r25", "10k",       "--beta",     "3950",
                                        "--span", "0:50",  "--circuit", "divider-low"};

const std::string kResistance = "expected a resistance such as 470, 4k7, 10k or 1M5";
const std::string kTemperature =
    "expected a temperature in \xC2\xB0"
    "C (e.g. -40 or 25) or in kelvin (e.g. 298.15K)";
const std::string kBelowZero =
    "is at or below absolute zero (-273.15 \xC2\xB0"
    "C)";
const std::string kKeys = "(keys are the long flag names with _ for -)";

}  // namespace

TEST_CASE("a mistyped resistance, B-value, temperature or step is refused by its flag and its text") {
    check_refused({
        {"a negative resistance", with(kModel, {"--r25", "-10k", "--span", "0:50"}),
         "--r25 '-10k': a resistance must be positive"},
        {"a zero resistance", with(kCheck, {"divider-low", "--rs", "0"}), "--rs '0': a resistance must be positive"},
        {"a zero load", with(kCheck, {"divider-low", "--rs", "10k", "--load", "0"}),
         "--load '0': a resistance must be positive"},
        {"a negative B-value",
         {"model", "--r25", "10k", "--beta", "-3950", "--span", "0:50"},
         "--beta '-3950': the B-value of an NTC must be positive (kelvin)"},
        {"a zero B-value",
         {"model", "--r25", "10k", "--beta", "0", "--span", "0:50"},
         "--beta '0': the B-value of an NTC must be positive (kelvin)"},
        {"a reversed span", with(kModel, {"--span", "50:0"}), "--span '50:0': the low end must be below the high end"},
        {"a span with equal ends", with(kModel, {"--span", "25:25"}),
         "--span '25:25': the low end must be below the high end"},
        {"an empty span", with(kModel, {"--span", ""}),
         "--span: expected LO:HI in \xC2\xB0"
         "C, e.g. -30:5 or 0:100"},
        {"a span below absolute zero", with(kModel, {"--span", "-300:0"}), "--span '-300:0': " + kBelowZero},
        {"a negative kelvin temperature", with(kModel, {"--span", "-5K:300K"}), "--span '-5K:300K': " + kBelowZero},
        {"a reference temperature below absolute zero", with(kModel, {"--span", "0:50", "--t0", "-274"}),
         "--t0 '-274': " + kBelowZero},
        {"a bridge null below absolute zero", with(kCheck, {"bridge", "--r1", "10k", "--null-at", "-300"}),
         "--null-at '-300': " + kBelowZero},
        {"a zero step", with(kModel, {"--span", "0:50", "--step", "0"}),
         "--step '0': the step must be a positive number of kelvin"},
        {"a negative step", with(kModel, {"--span", "0:50", "--step", "-1"}),
         "--step '-1': the step must be a positive number of kelvin"},
        // 50 K / 1e-6 K = 5e7 points, past the grid's limit of 1e6 (kMaxGridPoints).
        {"a step count past the limit", with(kModel, {"--span", "0:50", "--step", "1e-6"}),
         "--step '1e-6': gives more than 1000000 points over the span (50 K wide); use a larger step or a narrower "
         "--span"},
        // 1e300 °C: the default step of 1 K would need 1e300 points (by hand). The span is to blame, not
        // a step the user never typed.
        {"a span too wide for any grid", with(kModel, {"--span", "0:1e300"}),
         "--span '0:1e300': gives more than 1000000 points over the span (1e+300 K wide); use a larger step or a "
         "narrower --span"},
        {"NaN as a resistance", with(kCheck, {"divider-low", "--rs", "nan"}), "--rs 'nan': " + kResistance},
        {"NaN as a B-value",
         {"model", "--r25", "10k", "--beta", "NaN", "--span", "0:50"},
         "--beta 'NaN': expected a finite number"},
        {"infinity as a step", with(kModel, {"--span", "0:50", "--step", "inf"}),
         "--step 'inf': expected a finite number"},
        {"infinity as a span end", with(kModel, {"--span", "-inf:5"}), "--span '-inf:5': " + kTemperature},
        {"infinity as a voltage", with(kCheck, {"divider-low", "--rs", "10k", "--excitation", "inf"}),
         "--excitation 'inf': expected a number with an optional SI prefix, e.g. 100uV or 0.5"},
        {"a value that overflows after its prefix",
         with(kCheck, {"divider-low", "--rs", "10k", "--excitation", "1e308G"}),
         "--excitation '1e308G': is too large for a double"},
        {"a subnormal resistance", with(kModel, {"--r25", "1e-320", "--span", "0:50"}),
         "--r25 '1e-320': is too close to zero for a double (the smallest is about 2.2e-308)"},
        {"two multipliers in one value", with(kModel, {"--r25", "4k7k", "--span", "0:50"}),
         "--r25 '4k7k': two multiplier letters in one value"},
        {"two different multipliers", with(kCheck, {"divider-low", "--rs", "1k5M"}),
         "--rs '1k5M': two multiplier letters in one value"},
        {"milli for a resistance", with(kCheck, {"divider-low", "--rs", "10m"}),
         "--rs '10m': 'm' would mean milli; resistances take R, k, M or G"},
        {"a zero excitation", with(kCheck, {"divider-low", "--rs", "10k", "--excitation", "0"}),
         "--excitation '0': must be a positive value"},
        {"Steinhart-Hart with two coefficients",
         {"model", "--sh", "1e-3,2e-4", "--span", "0:50"},
         "--sh '1e-3,2e-4': expected three numbers A,B,C, e.g. 1.1e-3,2.4e-4,7.5e-8"},
        {"a negative dissipation constant", with(kCheck, {"divider-low", "--rs", "10k", "--dissipation", "-1"}),
         "--dissipation '-1': the dissipation constant must be positive (mW/K)"},
    });
}

TEST_CASE("a grid too coarse to judge linearity is refused with the largest step that would do") {
    // At least 5 points (the ends, the middle and one in each half; common practice): 0 to 50 °C at
    // 100 K leaves 0 and 50 (2 points); 50 K / 4 intervals = 12.5 K is the largest step (by hand).
    const std::string why = "judging linearity takes at least 5 (the ends, the middle and one in each half)";
    check_refused({
        {"a step wider than the span", with(kSize, {"--step", "100"}),
         "--step '100': leaves 2 points over the span (50 K wide); " + why + ": use a step of at most 12.5 K"},
        {"a step leaving 4 points", with(kCheck, {"divider-low", "--rs", "10k", "--step", "16.7"}),
         "--step '16.7': leaves 4 points over the span (50 K wide); " + why + ": use a step of at most 12.5 K"},
        // 0 to 2 °C at the default 1 K: 0, 1, 2 (3 points); the span is to blame, not a step never typed.
        {"a span too narrow for the default step",
         {"check", "--r25", "10k", "--beta", "3950", "--span", "0:2", "--circuit", "divider-low", "--rs", "10k"},
         "--span '0:2': leaves 3 points over the span (2 K wide); " + why + ": use a step of at most 0.5 K"},
    });
    // 12.5 K gives 0, 12.5, 25, 37.5, 50: exactly enough.
    CHECK(run_rtline(with(kSize, {"--step", "12.5"})).code == 0);
    CHECK(run_rtline(with(kBudget, {"--step", "12.5", "--trials", "100"})).code == 0);
}

TEST_CASE("a budget takes the grid rule, and a table a span of at least 5 converter codes") {
    const std::string why = "judging linearity takes at least 5 (the ends, the middle and one in each half)";
    // divider-low, 10k over 10k/3950 K from 0 to 45 °C: R = 33.62k and 4.348k at the ends (by hand, the
    // beta equation), ratios 0.7708 and 0.3030; at 3 bits (ratio k/8) that is 2.42 to 6.17, a swing of
    // 3.74 LSB holding codes 3, 4, 5 and 6.
    check_refused({
        {"a budget step wider than the span", with(kBudget, {"--step", "100"}),
         "--step '100': leaves 2 points over the span (50 K wide); " + why + ": use a step of at most 12.5 K"},
        {"a budget over a span too narrow for the default step",
         {"budget", "--r25", "10k", "--beta", "3950", "--span", "0:2", "--circuit", "divider-low", "--rs", "10k"},
         "--span '0:2': leaves 3 points over the span (2 K wide); " + why + ": use a step of at most 0.5 K"},
        {"a table over four codes", with(kTable, {"--adc-bits", "3"}),
         "--adc-bits '3': the span's output swing (3.74 LSB) covers 4 codes; a table takes at least 5 (the ends, the "
         "middle and one in each half): use more bits or a circuit with more swing"},
    });
    // At 4 bits the same span holds codes 5 to 12 (ratios 4.85 to 12.33 sixteenths): enough.
    CHECK(run_rtline(with(kTable, {"--adc-bits", "4"})).code == 0);
}

TEST_CASE("table and budget warn as check and size do: on stderr, and in JSON's warnings") {
    const std::string w =
        "--beta '8000': a B-value of 8000 K is unusual for an NTC part (most lie from 2000 to 6000 K)";
    for (auto args : {kTable, kBudget, kCheck, kSize}) {
        if (args == kCheck) args = with(args, {"divider-low", "--rs", "10k"});
        args = with(args, {"--beta", "8000", "--format"});
        for (const char* format : {"text", "csv", "json"}) {
            const auto r = run_rtline(with(args, {format}));
            INFO("rtline" << joined(args) << " " << std::string(format));
            CHECK(r.code == 0);
            CHECK(r.err == "rtline: warning: " + w + "\n");
            if (std::string(format) == "json") {
                CHECK(json::parse(r.out)["warnings"] == json::array({w}));
            } else {
                CHECK(r.out.find("8000 K is unusual") == std::string::npos);  // never in the data
            }
        }
    }
}

TEST_CASE("an unknown name, count or ADC width is refused by its flag and its text") {
    check_refused({
        {"an unknown circuit", with(kCheck, {"divider"}),
         "--circuit 'divider': unknown circuit; choose bare, divider-high, divider-low, shunt, shunt-divider, bridge "
         "or shunt-bridge"},
        {"an unknown series", with(kSize, {"--series", "E25"}),
         "--series 'E25': unknown series; choose E3, E6, E12, E24, E48, E96 or E192"},
        {"an unknown format", with(kModel, {"--span", "0:50", "--format", "xml"}),
         "--format 'xml': unknown format; choose text, json or csv"},
        {"Markdown from a command that writes none", with(kModel, {"--span", "0:50", "--format", "markdown"}),
         "--format 'markdown': unknown format; choose text, json or csv"},
        {"an unknown format where Markdown is one", with(kCheck, {"divider-low", "--rs", "10k", "--format", "xml"}),
         "--format 'xml': unknown format; choose text, json, csv or markdown"},
        {"an unknown reference line", with(kCheck, {"divider-low", "--rs", "10k", "--line", "straight"}),
         "--line 'straight': unknown line; choose endpoint, least-squares or minimax"},
        {"an unknown table spacing", with(kTable, {"--spacing", "log"}),
         "--spacing 'log': unknown spacing; choose code (evenly spaced codes), error (equal error per segment) or "
         "power-of-two (every 2^s codes, found by a shift)"},
        {"an unknown polynomial fit", with(kTable, {"--degree", "3", "--fit", "spline"}),
         "--fit 'spline': unknown fit; choose least-squares or minimax"},
        {"an unknown fit model",
         {"fit", "--points", "-", "--model", "table"},
         "--model 'table': fit takes sh (Steinhart-Hart) or beta",
         "t_c,r_ohm\n0,32k\n25,10k\n50,3k6\n"},
        {"an unknown flag", with(kModel, {"--span", "0:50", "--colour"}),
         "unknown option --colour for model (see rtline model --help)"},
        {"a flag without its value", with(kModel, {"--span", "0:50", "--step"}),
         "--step needs a value (see rtline model --help)"},
        // An empty name once read as "no file": the run printed its report and drew nothing, silently.
        {"an empty picture file name", with(kCheck, {"divider-low", "--rs", "10k", "--svg", ""}),
         "--svg: expects a file name, not an empty text (see rtline check --help)"},
        {"an empty output file name", with(kCheck, {"divider-low", "--rs", "10k", "-o", ""}),
         "--output: expects a file name, not an empty text (see rtline check --help)"},
        {"an empty R-T file name",
         {"fit", "--points", ""},
         "--points: expects a file name, not an empty text (see rtline fit --help)"},
        {"an empty spec file name", {"model", "--spec", ""}, "--spec: needs a file name ('-' for stdin)"},
        {"an ADC of zero bits", with(kTable, {"--adc-bits", "0"}), "--adc-bits '0': an ADC has 1 to 24 bits"},
        {"an ADC wider than 24 bits", with(kTable, {"--adc-bits", "25"}), "--adc-bits '25': an ADC has 1 to 24 bits"},
        {"a fractional ADC width", with(kTable, {"--adc-bits", "12.5"}),
         "--adc-bits '12.5': a bit count must be a whole number"},
        {"a negative count of candidates", with(kSize, {"--top", "-1"}),
         "--top '-1': expected a whole number from 1 to 1000"},
        {"a negative count of table entries", with(kTable, {"--entries", "-5"}),
         "--entries '-5': a table needs at least 2 entries"},
        {"a negative polynomial degree", with(kTable, {"--degree", "-1"}),
         "--degree '-1': choose a degree from 1 to 12"},
        {"a negative error target", with(kTable, {"--max-error", "-0.1"}),
         "--max-error '-0.1': the largest error must be positive (\xC2\xB0"
         "C)"},
        {"a fixed-point unit that is neither 0.1 nor 0.01", with(kTable, {"--unit", "0.5"}),
         "--unit '0.5': choose 0.1 or 0.01 (\xC2\xB0"
         "C per count of the fixed-point table)"},
        {"a reversed resistor range", with(kSize, {"--range", "10M:1"}),
         "--range '10M:1': the low end must be below the high end"},
    });
}

TEST_CASE("an argument mistake is named in our words, with the nearest real name and the --help to read") {
    // The nearest names are by edit distance (Damerau, "A technique for computer detection and correction
    // of spelling errors", 1964): --max-selfheating is one insertion from --max-self-heating, chekc one
    // swap from check (by hand).
    check_refused({
        {"an option one letter off", with(kSize, {"--max-selfheating", "0.05"}),
         "unknown option --max-selfheating for size; did you mean --max-self-heating? (see rtline size --help)"},
        {"an option of another command", with(kModel, {"--span", "0:50", "--compare"}),
         "unknown option --compare for model (see rtline model --help)"},
        {"an unknown command",
         {"linearize"},
         "unknown command 'linearize'; choose model, fit, check, size, table, budget or design (see rtline --help)"},
        {"a command two letters off",
         {"chekc"},
         "unknown command 'chekc'; did you mean check?; choose model, fit, check, size, table, budget or design (see "
         "rtline "
         "--help)"},
        {"no command",
         {},
         "no command given; choose model, fit, check, size, table, budget or design (see rtline --help)"},
        {"an option before the command",
         {"--verbose", "model"},
         "unknown option --verbose before the command; the program takes --help and --version (see rtline --help)"},
        {"a stray argument", with(kCheck, {"divider-low", "--rs", "10k", "stray"}),
         "unexpected argument 'stray': each value follows its flag, as in --rs 10k (see rtline check --help)"},
        {"a stray number", with(kCheck, {"divider-low", "--rs", "10k", "5k6"}),
         "unexpected argument '5k6': each value follows its flag, as in --rs 10k (see rtline check --help)"},
        {"a value running into the next flag", with(kSize, {"--top", "--series", "E12"}),
         "--top needs a value (see rtline size --help)"},
        {"an empty value after =", with(kSize, {"--top="}),
         "--top needs a value after the '=' (see rtline size --help)"},
        {"a value for a switch", with(kSize, {"--compare=yes"}), "--compare takes no value (see rtline size --help)"},
        {"a required flag left out",
         {"check", "--r25", "10k", "--beta", "3950", "--circuit", "divider-low"},
         "--span is required (see rtline check --help)"},
        {"--jsonl with CSV",
         {"model", "--jsonl", "--format", "csv"},
         "--format 'csv': not with --jsonl: each result is one line of JSON; leave out --format",
         ""},
        {"--jsonl with Markdown",
         {"check", "--jsonl", "--format", "markdown"},
         "--format 'markdown': not with --jsonl: each result is one line of JSON; leave out --format",
         ""},
    });
}

TEST_CASE("a mistyped trial count, tolerance or converter figure in a budget is refused") {
    const std::string tolerance = "a tolerance must be at least 0 and below 100 (percent)";
    check_refused({
        {"a negative trial count", with(kBudget, {"--trials", "-5"}),
         "--trials '-5': the number of trials must be a whole number from 0 to 100000000"},
        {"a fractional trial count", with(kBudget, {"--trials", "1.5"}),
         "--trials '1.5': the number of trials must be a whole number from 0 to 100000000"},
        // 0 to 20000 °C at the default 1 K: 20001 temperatures, past the budget's 10001 (kMaxBudgetPoints).
        {"a span too wide for a budget",
         {"budget", "--r25", "10k", "--beta", "3950", "--span", "0:20000", "--circuit", "divider-low", "--rs", "10k"},
         "--span '0:20000': gives 20001 temperatures; a budget takes at most 10001"},
        {"a trial count past the limit", with(kBudget, {"--trials", "1e9"}),
         "--trials '1e9': the number of trials must be a whole number from 0 to 100000000"},
        {"a negative tolerance", with(kBudget, {"--r25-tol", "-1"}), "--r25-tol '-1': " + tolerance},
        {"a tolerance of 100 %", with(kBudget, {"--resistor-tol", "100"}), "--resistor-tol '100': " + tolerance},
        {"NaN as a tolerance", with(kBudget, {"--beta-tol", "nan"}), "--beta-tol 'nan': expected a finite number"},
        {"a negative seed", with(kBudget, {"--seed", "-1"}),
         "--seed '-1': the seed must be a whole number from 0 to 18446744073709551615"},
        {"zero threads", with(kBudget, {"--threads", "0"}), "--threads '0': give 1 to 256 threads"},
        // One helper for every command that takes --threads: the same words in size as in budget.
        {"zero threads in size", with(kSize, {"--threads", "0"}), "--threads '0': give 1 to 256 threads"},
        {"a fractional thread count in size", with(kSize, {"--threads", "2.5"}),
         "--threads '2.5': give 1 to 256 threads"},
        {"a word for a thread count", with(kBudget, {"--threads", "all"}), "--threads 'all': give 1 to 256 threads"},
        {"an unknown distribution", with(kBudget, {"--distribution", "gauss"}),
         "--distribution 'gauss': unknown distribution; choose normal, normal-truncated or uniform"},
        {"a converter error without a converter", with(kBudget, {"--adc-error", "1"}),
         "--adc-error '1': needs --adc-bits (an LSB needs a resolution)"},
        {"a zero dissipation constant", with(kBudget, {"--dissipation", "0"}),
         "--dissipation '0': the dissipation constant must be positive (mW/K)"},
    });
}

TEST_CASE("a budget refuses the amplifier's errors without an amplifier, or in volts against no known volts") {
    const std::vector<std::string> bridge = {"budget", "--r25", "10k",    "--beta",   "3950",
                                             "--span", "0:50",  "--step", "10",       "--circuit",
                                             "bridge", "--r1",  "10k",    "--trials", "0"};
    check_refused({
        {"an input offset on a ratiometric reading without the excitation's volts",
         with(bridge, {"--auto-range", "--amp-offset", "50u"}),
         "--amp-offset '50u': is in volts, and a ratiometric reading is a fraction of the excitation; give the "
         "excitation in volts with --excitation"},
        {"a bias current likewise", with(bridge, {"--gain", "20", "--amp-bias", "1n"}),
         "--amp-bias '1n': is in volts, and a ratiometric reading is a fraction of the excitation; give the "
         "excitation in volts with --excitation"},
        {"an amplifier's error without an amplifier", with(kBudget, {"--amp-offset-drift", "1u"}),
         "--amp-offset-drift '1u': needs an amplifier: give --gain or --auto-range"},
        {"a negative input offset", with(bridge, {"--auto-range", "--excitation", "5", "--amp-offset", "-1u"}),
         "--amp-offset '-1u': must be 0 or more (a bound, +-V)"},
        {"a gain error of 100 %", with(bridge, {"--auto-range", "--amp-gain-tol", "100"}),
         "--amp-gain-tol '100': a tolerance must be at least 0 and below 100 (percent)"},
        // The bridge nulls at 0 degC (r3 = R_T(0)): V_A - V_B falls from 0 as R_T falls, so a gain of 10
        // takes the converter input below 0 everywhere past the null.
        {"an amplifier for size's nonlinearity, which it maps linearly", with(kSize, {"--gain", "4"}),
         "--gain '4': an amplifier maps the output linearly, so the nonlinearity is the network's own; give "
         "--objective resolution or total-error"},
        {"an amplifier that drives the converter input below its range",
         with(bridge, {"--gain", "10", "--adc-bits", "12"}),
         "--gain '10': through the amplifier the converter input reaches -5.06684 V/V, below the converter's "
         "range; change --gain and --offset or use --auto-range"},
    });
}

TEST_CASE("a model that cannot describe the span, or a circuit whose output does not change, is refused") {
    check_refused({
        // R(-265 °C) = 10k·exp(6000·(1/8.15 − 1/298.15)) = 10k·e^716.1 (by hand): beyond a double's
        // 1.8e308 = e^709.8.
        {"a model that overflows a double",
         {"model", "--r25", "10k", "--beta", "6000", "--span", "-265:50"},
         "--span '-265:50': the model's resistance overflows a double over this span"},
        // d(1/T)/d ln R = B + 3C·ln²R = 2e-4 − 3e-5·ln²R is positive only for |ln R| < 2.58; there
        // 1/T reaches at most 1e-3 + 2e-4·2.58 − 1e-5·2.58³ = 1.34e-3, i.e. T ≥ 745 K (by hand), so no
        // monotonic branch covers -50 to 150 °C.
        {"Steinhart-Hart coefficients not monotonic over the span",
         {"model", "--sh", "1e-3,2e-4,-1e-5", "--span", "-50:150"},
         "--span '-50:150': the Steinhart-Hart coefficients do not give a resistance that falls monotonically with "
         "temperature over this span"},
        {"the same coefficients in check",
         with({"check", "--sh", "1e-3,2e-4,-1e-5", "--span", "-50:150", "--circuit"}, {"divider-low", "--rs", "10k"}),
         "--span '-50:150': the Steinhart-Hart coefficients do not give a resistance that falls monotonically with "
         "temperature over this span"},
        {"the same coefficients in size",
         {"size", "--sh", "1e-3,2e-4,-1e-5", "--span", "-50:150", "--circuit", "shunt"},
         "--span '-50:150': the Steinhart-Hart coefficients do not give a resistance that falls monotonically with "
         "temperature over this span"},
        {"the same coefficients in table",
         {"table", "--sh", "1e-3,2e-4,-1e-5", "--span", "-50:150", "--circuit", "divider-low", "--rs", "10k"},
         "--span '-50:150': the Steinhart-Hart coefficients do not give a resistance that falls monotonically with "
         "temperature over this span"},
        // A current source forces I through rs whatever R_T is: the output is I·rs = 1 V at every
        // temperature (by hand), a zero full-scale output that %FSD would divide by.
        {"a zero full-scale output", with(kCheck, {"divider-high", "--rs", "10k", "--current", "100u"}),
         "--circuit 'divider-high': the output does not change over the span (zero full-scale output)"},
    });
}

TEST_CASE("a broken R-T file is refused by its line, its column and the field's text") {
    const std::vector<std::string> fit = {"fit", "--points", "-"};
    check_refused({
        {"a resistance that rises with temperature", fit,
         "stdin:4:2 '11000 ohm': the resistance at 50 C does not fall below that at 25 C (line 3); an NTC's must fall "
         "strictly",
         "t_c,r_ohm\n0,32k\n25,10k\n50,11k\n"},
        {"a resistance that stays the same", fit,
         "stdin:4:2 '10000 ohm': the resistance at 50 C does not fall below that at 25 C (line 3); an NTC's must fall "
         "strictly",
         "t_c,r_ohm\n0,32k\n25,10k\n50,10k\n"},
        {"a duplicate temperature", fit, "stdin:4:1 '25 C': duplicate temperature (also on line 3)",
         "t_c,r_ohm\n0,32k\n25,10k\n25,9k\n"},
        {"an empty file", fit, "stdin: contains no R-T points", ""},
        {"a file of comments only", fit, "stdin: contains no R-T points", "# freezer room sensor\n\n"},
        {"a binary file", fit, "stdin:1: is not a text file (a NUL byte at byte 3 of the line)",
         std::string("PK\0\x03\x04", 5)},
        {"a negative resistance", fit, "stdin:3:2 '-10k': a resistance must be positive",
         "t_c,r_ohm\n0,32k\n25,-10k\n"},
        {"a temperature below absolute zero", fit, "stdin:3:1 '-300': is at or below absolute zero (-273.15 C)",
         "t_c,r_ohm\n0,32k\n-300,10k\n"},
        {"NaN as a resistance", fit, "stdin:3:2 'nan': " + kResistance, "t_c,r_ohm\n0,32k\n25,nan\n"},
        {"infinity as a temperature", fit, "stdin:3:1 'inf': expected a temperature (a plain number)",
         "t_c,r_ohm\n0,32k\ninf,10k\n"},
        {"an unknown column", fit, "stdin:1:3 'ohms': unknown column; the header names t_c or t_k and r_ohm or r_kohm",
         "t_c,r_ohm,ohms\n"},
        {"a row with an extra field", fit, "stdin:3:3 '25,10k,9': expected 2 fields, found 3",
         "t_c,r_ohm\n0,32k\n25,10k,9\n"},
        {"too few points for Steinhart-Hart", fit, "stdin '2 points': this model needs at least 3 R-T points",
         "t_c,r_ohm\n0,32k\n25,10k\n"},
        {"too few points for a beta fit", with(fit, {"--model", "beta"}),
         "stdin '1 point': this model needs at least 2 R-T points", "t_c,r_ohm\n0,32k\n"},
        // ln R = 1, 0, −1: the Steinhart-Hart matrix [1, L, L³] has determinant
        // (L2−L1)(L3−L1)(L3−L2)(L1+L2+L3) = 0 (by hand), so no unique fit exists.
        {"points that do not determine a Steinhart-Hart fit", fit,
         "--points '3 points': the points do not determine a Steinhart-Hart fit (too few distinct resistances, or "
         "collinear in ln R)",
         "t_c,r_ohm\n0,2.718281828459045\n25,1\n50,0.36787944117144233\n"},
        // Through 1e300, 1e-300 and 1e-301 ohm the exact coefficients are B < 0 with a large C: the
        // curve turns back between the points (1/T against ln R is not monotonic).
        {"a Steinhart-Hart fit that is not monotonic", fit,
         "--points '3 points': the Steinhart-Hart fit does not give a resistance that falls monotonically from 0 to 50 "
         "\xC2\xB0"
         "C; check the points, or use the beta model",
         "t_c,r_ohm\n0,1e300\n25,1e-300\n50,1e-301\n"},
        // A temperature mistyped as 5.6e57 C (the R-T fuzzer's first finding): the exact fit through it
        // cannot give it back (fit_test), so the reader stops it first, by its line and column.
        {"a temperature far beyond any thermistor's", fit,
         "stdin:4:1 '5.555556e57': is outside the range of an R-T point, 0.001 to 10000 K (a typing mistake?)",
         "t_c,r_ohm\n60,8k7\n46,10k\n5.555556e57,1\n"},
        // At 8e-215 K, T^2 = 6.4e-429 is below the smallest double (4.9e-324), so the table's alpha =
        // -(d ln R / d(1/T)) / T^2 was infinite (by hand; the R-T fuzzer's second finding).
        {"a temperature next to absolute zero",
         {"check", "--points", "-", "--model", "table", "--span", "8e-215K:298.15K", "--circuit", "divider-low", "--rs",
          "10k"},
         "stdin:2:1 '8e-215': is outside the range of an R-T point, 0.001 to 10000 K (a typing mistake?)",
         "t_k,r_ohm\n8e-215,97k\n273.15,32k\n298.15,10k\n"},
        {"a table model asked outside its points",
         {"model", "--points", "-", "--model", "table", "--span", "0:60"},
         "--span '0:60': outside the R-T table, which covers 0 to 50 \xC2\xB0"
         "C",
         "t_c,r_ohm\n0,32k\n25,10k\n50,3k6\n"},
        {"a folder instead of a file",
         {"fit", "--points", rtline::test::source_dir()},
         "--points '" + rtline::test::source_dir() + "': is a folder, not a file"},
    });
}

TEST_CASE("a broken spec file is refused by its key or its position") {
    const std::vector<std::string> model = {"model", "--spec", "-"};
    check_refused({
        {"an unknown key", model, "spec key 'colour': is not a key of 'model' " + kKeys,
         R"({"r25": "10k", "beta": 3950, "span": "0:50", "colour": "red"})"},
        {"a flag's name with a dash", model, "spec key 'null-at': is not a key of 'model' " + kKeys,
         R"({"null-at": 10})"},
        {"a list where a value goes", model, "spec key 'r25' '[\"10k\"]': expected a number or a string",
         R"({"r25": ["10k"]})"},
        {"null where a value goes", model, "spec key 'step' 'null': expected a number or a string",
         R"({"step": null})"},
        {"a boolean where a value goes", model, "spec key 'format' 'true': expected a number or a string",
         R"({"format": true})"},
        {"a string where a switch goes",
         {"size", "--spec", "-"},
         "spec key 'compare' '\"yes\"': expected true or false",
         R"({"compare": "yes"})"},
        // The text is 36 bytes long (counted by hand); nlohmann's parser reports the end of the input
        // inside the string as byte 37.
        {"truncated JSON", model, "--spec 'stdin': is not valid JSON (at byte 37)",
         R"({"r25":"10k","beta":3950,"span":"0:5)"},
        {"an empty spec file", model, "--spec 'stdin': is not valid JSON (at byte 1)", ""},
        {"a binary spec file", model, "--spec 'stdin': is not a text file (NUL bytes)", std::string("{\0}", 3)},
        {"a spec that is not an object", model, "--spec 'array': a spec must be a JSON object", "[1, 2]"},
        {"a number beyond a double", model, "--spec 'stdin': holds a number too large for a double (1e400)",
         R"({"r25": 1e400})"},
        {"a spec naming another spec", model, "spec key 'spec': is not allowed inside a spec", R"({"spec": "x.json"})"},
        {"a bad value inside a spec", model, "--beta '-1': the B-value of an NTC must be positive (kelvin)",
         R"({"r25": "10k", "beta": -1, "span": "0:50"})"},
        {"an rtline document without its model's values", model,
         "spec key 'model.r0_ohm': is missing from the rtline document",
         R"({"tool": "rtline", "model": {"kind": "beta"}})"},
        {"an rtline document with an unknown model", model,
         "spec key 'model.kind' 'spline': expected beta, steinhart-hart or table",
         R"({"tool": "rtline", "model": {"kind": "spline"}})"},
    });
}

TEST_CASE("a JSON Lines batch reports each bad line on stdout and goes on, exit code 2") {
    const std::string good = R"({"r25": "10k", "beta": 3950, "span": "0:50", "step": 25})";
    const std::string input = good + "\n" +  // line 1
                              R"({"r25": "10k", "beta": -1, "span": "0:50"})"
                              "\n"  // line 2: a bad value
                              R"({"r25": "10k", "beta)"
                              "\n"  // line 3: truncated
                              "\n"  // line 4: blank, skipped
                              R"({"r25": 1e999})"
                              "\n"       // line 5: beyond a double
                              "[1]\n" +  // line 6: not an object
                              good +
                              "\n";  // line 7
    const auto r = run_rtline({"model", "--jsonl"}, input);
    INFO("stdout: " << r.out << "stderr: " << r.err);
    CHECK(r.code == 2);
    CHECK(r.err.empty());
    std::vector<json> lines;
    std::size_t start = 0;
    for (std::size_t nl; (nl = r.out.find('\n', start)) != std::string::npos; start = nl + 1) {
        lines.push_back(json::parse(r.out.substr(start, nl - start)));
    }
    REQUIRE(lines.size() == 6);
    CHECK(lines[0]["command"] == "model");
    CHECK(lines[0]["points"].size() == 3);  // 0, 25 and 50 °C
    CHECK(lines[1] == json{{"line", 2}, {"error", "--beta '-1': the B-value of an NTC must be positive (kelvin)"}});
    // Line 3 is 20 bytes (counted by hand); the parser meets the end of input as byte 21.
    CHECK(lines[2] == json{{"line", 3}, {"error", "line 3: is not valid JSON (at byte 21)"}});
    CHECK(lines[3] == json{{"line", 5}, {"error", "line 5: holds a number too large for a double (1e999)"}});
    CHECK(lines[4] == json{{"line", 6}, {"error", "line 6 'array': a spec must be a JSON object"}});
    CHECK(lines[5] == lines[0]);
}

TEST_CASE("a JSON Lines batch exits 1 when a line has no feasible design, and 2 when a line is also bad") {
    // --min-span 2 V/V cannot be met: a ratiometric output spans at most 1 V/V.
    const std::string infeasible =
        R"({"r25": "10k", "beta": 3950, "span": "0:50", "circuit": "divider-low", "min_span": 2})";
    const std::string bad = R"({"r25": "10k", "beta": 3950, "span": "0:50", "circuit": "divider-low", "top": -1})";
    const auto only_infeasible = run_rtline({"size", "--jsonl"}, infeasible + "\n");
    CHECK(only_infeasible.code == 1);
    CHECK(json::parse(only_infeasible.out)["infeasible"] == true);
    const auto both = run_rtline({"size", "--jsonl"}, infeasible + "\n" + bad + "\n");
    CHECK(both.code == 2);
    CHECK(both.out.find(R"({"line":2,"error":"--top '-1': expected a whole number from 1 to 1000"})") !=
          std::string::npos);
}

// The plausibility rules (include/rtline/plausibility.hpp, docs/model.md): the limits are common practice
// for NTC sensing parts, B from 2000 to 6000 K (none outside 1000 to 10000 K) and R25 from 100 ohm to
// 10 Mohm (none outside 1 ohm to 1 Gohm); the figures in the messages are by hand unless noted.
TEST_CASE("a thermistor no NTC part could be is refused, and an unusual one warned, with the likely slip") {
    const std::string b_range = "is outside what NTC parts have (1000 to 10000 K; most lie from 2000 to 6000 K)";
    const std::string r_range = "is outside what NTC parts have (1 ohm to 1G ohm; most lie from 100 ohm to 10M ohm)";
    check_refused({
        {"a B-value with a digit too many", with(kModel, {"--beta", "39500", "--span", "0:50"}),
         "--beta '39500': a B-value of 39500 K " + b_range + "; a digit too many?"},
        {"a B-value with a digit missing",
         {"check", "--r25", "10k", "--beta", "395", "--span", "0:50", "--circuit", "divider-low", "--rs", "10k"},
         "--beta '395': a B-value of 395 K " + b_range + "; a digit missing?"},
        {"a resistance in milliohm",
         {"model", "--r25", "1e-3", "--beta", "3950", "--span", "0:50"},
         "--r25 '1e-3': a resistance of 0R001 ohm at 25 \xC2\xB0"
         "C " +
             r_range},
        {"a resistance past 1 Gohm",
         {"model", "--r25", "5G", "--beta", "3950", "--span", "0:50"},
         "--r25 '5G': a resistance of 5G ohm at 25 \xC2\xB0"
         "C " +
             r_range},
        // 1 ohm stated at 0 °C with B = 3950 K is 1·exp(3950·(1/298.15 − 1/273.15)) = e^-1.2126 = 0.2974 ohm
        // at 25 °C (by hand), below any part; the hint is the value a thousand times larger.
        {"a resistance judged at 25 degC, not at T0",
         {"model", "--r25", "1", "--beta", "3950", "--t0", "0", "--span", "0:50"},
         "--r25 '1': a resistance of 0R2974 ohm at 25 \xC2\xB0"
         "C " +
             r_range + "; did you mean 297R4?"},
        {"a reference temperature in kelvin", with(kModel, {"--t0", "298.15", "--span", "0:50"}),
         "--t0 '298.15': looks like kelvin without its K (298.15 K = 25 \xC2\xB0"
         "C); write 25 or 298.15K"},
        {"a beta fit's reference temperature in kelvin",
         {"fit", "--points", "-", "--model", "beta", "--t0", "273.15"},
         "--t0 '273.15': looks like kelvin without its K (273.15 K = 0 \xC2\xB0"
         "C); write 0 or 273.15K",
         "t_c,r_ohm\n0,32k\n25,10k\n50,3k6\n"},
        {"a span in kelvin", with(kCheck, {"divider-low", "--rs", "10k", "--span", "233.15:303.15"}),
         "--span '233.15:303.15': looks like kelvin without its K (233.15 to 303.15 K = -40 to 30 \xC2\xB0"
         "C); "
         "write -40:30 or 233.15K:303.15K"},
        {"a span in kelvin for a table",
         {"table", "--r25", "10k", "--beta", "3950", "--span", "273.15:318.15", "--circuit", "divider-low", "--rs",
          "10k"},
         "--span '273.15:318.15': looks like kelvin without its K (273.15 to 318.15 K = 0 to 45 \xC2\xB0"
         "C); "
         "write 0:45 or 273.15K:318.15K"},
    });
    check_warned({
        {"an unusually steep B-value", with(kModel, {"--beta", "8000", "--span", "0:50"}),
         "--beta '8000': a B-value of 8000 K is unusual for an NTC part (most lie from 2000 to 6000 K)"},
        {"a resistance typed without its k",
         {"model", "--r25", "10", "--beta", "3950", "--span", "0:50"},
         "--r25 '10': a resistance of 10 ohm at 25 \xC2\xB0"
         "C is unusual for an NTC sensor (most lie from 100 ohm "
         "to 10M ohm); did you mean 10k?"},
        // 310 °C is past the 300 °C of glass-encapsulated parts, but a high-temperature part may be meant.
        {"a reference temperature that may be kelvin", with(kModel, {"--t0", "310", "--span", "0:50"}),
         "--t0 '310': is above 300 \xC2\xB0"
         "C, beyond most NTC parts; if it is kelvin (310 K = 36.85 \xC2\xB0"
         "C), "
         "write 36.85 or 310K"},
        {"a span that may be kelvin", with(kModel, {"--span", "250:350"}),
         "--span '250:350': reaches above 300 \xC2\xB0"
         "C, beyond most NTC parts; if it is kelvin (250 to 350 K = "
         "-23.15 to 76.85 \xC2\xB0"
         "C), write -23.15:76.85 or 250K:350K"},
    });
    // Typed in kelvin with the K, or in °C, the same span and T0 pass silently.
    for (const auto& args : {with(kModel, {"--t0", "298.15K", "--span", "233.15K:303.15K"}),
                             with(kModel, {"--t0", "25", "--span", "-40:30"}), with(kModel, {"--span", "200:300"})}) {
        INFO("rtline" << joined(args));
        const auto r = run_rtline(args);
        CHECK(r.code == 0);
        CHECK(r.err.empty());
    }
}

namespace {

// The freezer-room points of examples/freezer-room-rt.csv from -40 to 40 °C in steps of 10 K, with the
// temperature column written by `column` (°C, or the mistaken kelvin or °F).
std::string freezer_points(double (*column)(double)) {
    const int t_c[] = {-40, -30, -20, -10, 0, 10, 20, 30, 40};
    const char* r_ohm[] = {"336700", "177000", "97110", "55360", "32680", "19920", "12510", "8068", "5334"};
    std::string csv = "t_c,r_ohm\n";
    for (int i = 0; i < 9; ++i) csv += rtline::format_number(column(t_c[i]), 8) + "," + r_ohm[i] + "\n";
    return csv;
}

json freezer_ref(double (*column)(double)) {
    json t = json::array();
    for (const int c : {-40, -30, -20, -10, 0, 10, 20, 30, 40}) t.push_back(column(c));
    return python_ref("beta_readings.py",
                      {{"t", t}, {"r_ohm", {336700, 177000, 97110, 55360, 32680, 19920, 12510, 8068, 5334}}});
}

std::string fixed0(double v) { return rtline::format_fixed(v, 0); }

}  // namespace

TEST_CASE("an R-T file whose temperature column reads as kelvin or as degF is refused, naming the mistake") {
    const auto as_kelvin = [](double c) { return c + 273.15; };
    const auto as_fahrenheit = [](double c) { return 1.8 * c + 32.0; };
    // The beta fits under each reading by numpy (tests/ref/beta_readings.py).
    const json k = freezer_ref(as_kelvin);
    const json f = freezer_ref(as_fahrenheit);
    // Read as °C, the kelvin column implies B of about 15300 K and R25 of about 4.5e14 ohm (no part).
    CHECK(k["celsius"]["b_k"].get<double>() > 10000.0);
    CHECK(k["kelvin"]["b_k"].get<double>() == doctest::Approx(3802.0).epsilon(1e-3));
    const std::string kelvin_why =
        "the temperatures read as kelvin, not \xC2\xB0"
        "C: as \xC2\xB0"
        "C the points imply B = " +
        fixed0(k["celsius"]["b_k"].get<double>()) + " K and " +
        rtline::format_resistance(k["celsius"]["r25_ohm"].get<double>(), 4) +
        " ohm at 25 \xC2\xB0"
        "C, as kelvin B = " +
        fixed0(k["kelvin"]["b_k"].get<double>()) + " K and " +
        rtline::format_resistance(k["kelvin"]["r25_ohm"].get<double>(), 4) +
        " ohm at 25 \xC2\xB0"
        "C; give them in \xC2\xB0"
        "C, or head the column t_k";
    // Read as °C, the °F column gives a plausible B (2642 K) but misses the points 10 times more than
    // read as °F (5335 mK against 543 mK).
    CHECK(f["celsius"]["max_residual_k"].get<double>() > 5.0 * f["fahrenheit"]["max_residual_k"].get<double>());
    const std::string fahrenheit_why =
        "the temperatures read as \xC2\xB0"
        "F, not \xC2\xB0"
        "C: a beta model misses the points by up to " +
        fixed0(1e3 * f["celsius"]["max_residual_k"].get<double>()) +
        " mK as \xC2\xB0"
        "C and " +
        fixed0(1e3 * f["fahrenheit"]["max_residual_k"].get<double>()) +
        " mK as \xC2\xB0"
        "F; convert them to \xC2\xB0"
        "C";
    const std::string in_kelvin = freezer_points(as_kelvin);
    const std::string in_fahrenheit = freezer_points(as_fahrenheit);
    check_refused({
        {"kelvin under t_c, fitted", {"fit", "--points", "-"}, "stdin: " + kelvin_why, in_kelvin},
        {"kelvin under t_c, as a beta fit",
         {"fit", "--points", "-", "--model", "beta"},
         "stdin: " + kelvin_why,
         in_kelvin},
        {"kelvin under t_c, as a table model",
         {"model", "--points", "-", "--model", "table", "--span", "250:300"},
         "stdin: " + kelvin_why,
         in_kelvin},
        {"degF under t_c, fitted", {"fit", "--points", "-"}, "stdin: " + fahrenheit_why, in_fahrenheit},
        {"degF under t_c, in check",
         {"check", "--points", "-", "--span", "0:40", "--circuit", "divider-low", "--rs", "10k"},
         "stdin: " + fahrenheit_why,
         in_fahrenheit},
    });
    // The same points in °C, and in kelvin under t_k, pass without a word.
    const std::string in_celsius = freezer_points([](double c) { return c; });
    std::string under_t_k = in_kelvin;
    under_t_k.replace(0, 3, "t_k");
    for (const std::string& csv : {in_celsius, under_t_k}) {
        const auto r = run_rtline({"fit", "--points", "-"}, csv);
        CHECK(r.code == 0);
        CHECK(r.err.empty());
    }
    // Points of a beta model with B = 8000 K (R = 10k·exp(8000·(1/T − 1/298.15)) at 0, 25 and 50 °C, by
    // hand): a part could have it, so the fit goes on with a warning.
    check_warned({{"an unusually steep B from points",
                   {"fit", "--points", "-", "--model", "beta"},
                   "stdin: fitted to the points, a B-value of 8000 K is unusual for an NTC part (most lie from 2000 to "
                   "6000 K)",
                   "t_c,r_ohm\n0,116558.19\n25,10000\n50,1254.5272\n"}});
}

TEST_CASE("a design's requirements and parts file are refused by their flag, column or line") {
    const std::vector<std::string> design = {"design", "--span", "-30:10", "--step", "2", "--adc-bits", "12"};
    const std::vector<std::string> one = with(design, {"--r25", "10k", "--beta", "3950"});
    const std::vector<std::string> parts = with(design, {"--max-error", "1", "--candidates", "-"});
    check_refused({
        {"no accuracy target", one, "--max-error: give the accuracy the design must meet, degC"},
        {"a zero target", with(one, {"--max-error", "0"}), "--max-error '0': the target must be positive (degC)"},
        {"a confidence that is no percentile the budget gives", with(one, {"--max-error", "1", "--confidence", "90"}),
         "--confidence '90': unknown confidence; choose worst-case, 95 or 99.7 (a Monte Carlo percentile of |error|)"},
        {"a resistor range turned round", with(one, {"--max-error", "1", "--range", "1M:100"}),
         "--range '1M:100': the low end must be below the high end"},
        {"a table unit other than 0.1 or 0.01", with(one, {"--max-error", "1", "--unit", "0.5"}),
         "--unit '0.5': choose 0.1 or 0.01 (degC per count of the fixed-point table)"},
        {"CSV output for a whole design", with(one, {"--max-error", "1", "--format", "csv"}),
         "--format 'csv': design writes text, json or markdown"},
        {"a bridge, which needs an amplifier", with(one, {"--max-error", "1", "--circuit", "bridge"}),
         "--circuit 'bridge': a design chooses among the dividers (divider-high, divider-low, shunt-divider), "
         "which the converter reads directly; a bridge needs an amplifier and a bare or shunt thermistor a current "
         "source"},
        {"no converter",
         {"design", "--span", "-30:10", "--r25", "10k", "--beta", "3950", "--max-error", "1"},
         "--adc-bits: give the converter's resolution in bits"},
        {"an unknown column in the parts file", parts,
         "--candidates line 1 'colour': unknown column; the columns are label, r25_ohm, b_k, t0_c, points, "
         "r25_tol_pct, b_tol_pct and dissipation_mw_per_k",
         "label,r25_ohm,b_k,colour\nx,10k,3950,red\n"},
        {"a short row in the parts file", parts, "--candidates line 2 'x,10k': has 2 cells for 3 columns",
         "label,r25_ohm,b_k\nx,10k\n"},
        {"a parts file with no part", parts, "--candidates '-': holds no part (a header line, then one part a line)",
         "label,r25_ohm,b_k\n"},
        {"a model and a parts file", with(parts, {"--r25", "10k"}),
         "--candidates '-': give the thermistor one way: a model, or --candidates", "label,r25_ohm,b_k\nx,10k,3950\n"},
        {"a part's dissipation constant without a drive", parts,
         "--candidates '-': a part's dissipation_mw_per_k asks for its self-heating, which needs the real drive; give "
         "--excitation V (with --adc-ref excitation for a ratiometric reading)",
         "label,r25_ohm,b_k,dissipation_mw_per_k\nx,10k,3950,1.5\n"},
        {"no thermistor at all", with(design, {"--max-error", "1"}),
         "--r25: no thermistor given; use --r25 and --beta, --sh A,B,C, --points FILE, or a parts file of candidates "
         "with --candidates FILE"},
        {"a package folder that is a file", with(one, {"--max-error", "1", "-o", "/dev/null"}),
         "-o '/dev/null': is a file; design writes its review package (report.md, design.json, the header, the "
         "pictures) into a folder"},
        {"a parts file that does not exist", with(design, {"--max-error", "1", "--candidates", "/no/such/parts.csv"}),
         "--candidates '/no/such/parts.csv': cannot be opened"},
    });
}
