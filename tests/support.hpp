// Test helpers: run the built rtline program or a reference tool (python3 with numpy/scipy, ngspice)
// and capture its exit code, stdout and stderr; temporary files.
#pragma once

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace rtline::test {

struct Run {
    int code = -1;
    std::string out;
    std::string err;
};

// Runs a shell command line with `input` on stdin; captures everything.
Run run_shell(const std::string& command, const std::string& input = "");

// Runs the built rtline with the given arguments (each quoted for the shell).
Run run_rtline(const std::vector<std::string>& args, const std::string& input = "");

// Runs the built rtline with `args`, requires exit 0 (its stderr shown when not), and returns its
// stdout parsed as JSON.
nlohmann::json run_json_ok(const std::vector<std::string>& args);

// Checks a budget document's worst case at each of its temperatures against a numpy corner
// enumeration's {"low_k", "high_k"} per point, to 1e-9 relative (the root finders' precision); the
// two have the same number of points.
void check_worst_case(const nlohmann::json& budget, const nlohmann::json& ref);

// Checks a budget document's Monte Carlo at its first `points` temperatures against a numpy
// reference's statistics and their standard errors (tests/ref/sample_stats.py): the mean and standard
// deviation within 4·√2 of the reference's standard errors (two independent estimates; a 6e-5 chance
// per check for a normal difference), each percentile that plus one LSB's worth of temperature (the
// converter's codes make the errors discrete, so a percentile may land on either neighbour).
void check_monte_carlo(const nlohmann::json& budget, const nlohmann::json& ref, std::size_t points);

// Runs tests/ref/<script> with Debian's python3 (which has python3-numpy and python3-scipy), the JSON
// `input` on stdin; returns its stdout parsed as JSON. Fails the test if the script fails.
nlohmann::json python_ref(const std::string& script, const nlohmann::json& input);

// True when a Debian-packaged reference tool is on the machine (setup.sh installs them).
bool have_program(const std::string& name);

// ngspice netlist helpers shared by the circuit and front-end checks against ngspice.
// A number as a netlist writes it: 17 significant figures, enough to round-trip a double.
std::string num(double v);
// The thermistor resistances the ngspice cases evaluate: beta model, R25 = 10 kohm, B = 3950 K (our
// own plausible part) at -30, 0, 25, 60 and 105 degC.
std::vector<double> thermistor_resistances();
// Agreement with ngspice to 1e-12 relative: ngspice solves the linear nodal equations of a resistive
// network in double precision in one Newton step (its convergence tolerances never come into play) and
// prints 18 figures; the two agree to better than 1e-14 (measured), so 1e-12 leaves room for LU
// rounding only. A bridge's output is a difference of nearly equal node voltages, so the comparison
// is relative to the larger of the value and the drive's scale `scale`.
bool close(double got, double want, double scale);

// `rtline check` for our own thermistor (beta model, R25 = 10 kohm, B = 3950 K) with `more` after it.
std::vector<std::string> check_args(const std::vector<std::string>& more);

// A fresh temporary file path (not created), removed when the object dies.
class TempPath {
public:
    explicit TempPath(const std::string& suffix = "");
    ~TempPath();
    TempPath(const TempPath&) = delete;
    TempPath& operator=(const TempPath&) = delete;
    [[nodiscard]] const std::string& str() const { return path_; }

private:
    std::string path_;
};

void write_file(const std::string& path, const std::string& text);
std::string read_file(const std::string& path);

// The source tree (for examples/ and tests/ref/).
std::string source_dir();

}  // namespace rtline::test
