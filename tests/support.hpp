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

// Runs tests/ref/<script> with Debian's python3 (which has python3-numpy and python3-scipy), the JSON
// `input` on stdin; returns its stdout parsed as JSON. Fails the test if the script fails.
nlohmann::json python_ref(const std::string& script, const nlohmann::json& input);

// True when a Debian-packaged reference tool is on the machine (setup.sh installs them).
bool have_program(const std::string& name);

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
