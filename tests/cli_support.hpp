// Shared pieces of the tests that run the built program as a process (resume, predict,
// sweep): a scratch folder of the test process's own, file contents as text, and a run of
// the program with its exit code and what it printed.
#pragma once

#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>
#include <system_error>

namespace tessera::clitest {

namespace fs = std::filesystem;

// A folder named `name`-<pid> under the temporary directory, fresh when made, removed at
// exit unless TESSERA_KEEP_TEST_FILES is set (to look at what a failed test left).
class ScratchDir {
public:
    explicit ScratchDir(const std::string& name)
        : dir_(fs::temp_directory_path() / (name + "-" + std::to_string(::getpid()))) {
        fs::remove_all(dir_);
        fs::create_directories(dir_);
    }
    ~ScratchDir() {
        std::error_code ec;
        if (!std::getenv("TESSERA_KEEP_TEST_FILES")) fs::remove_all(dir_, ec);
    }
    ScratchDir(const ScratchDir&) = delete;
    ScratchDir& operator=(const ScratchDir&) = delete;
    const fs::path& path() const { return dir_; }

private:
    fs::path dir_;
};

inline std::string slurp(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

inline void spit(const fs::path& p, const std::string& text) { std::ofstream(p, std::ios::binary) << text; }

// The exit code of a wait status: the program's own, or 128 + the signal that ended it.
inline int exit_code(int status) {
    if (WIFEXITED(status)) return WEXITSTATUS(status);
    if (WIFSIGNALED(status)) return 128 + WTERMSIG(status);
    return -1;
}

// Runs `program` with `args` (already quoted for the shell), its output going to files in
// `scratch`; returns the exit code and, when asked, what it printed.
inline int run_program(const std::string& program, const std::string& args, const fs::path& scratch,
                       std::string* out = nullptr, std::string* err = nullptr) {
    const fs::path o = scratch / "stdout.txt", e = scratch / "stderr.txt";
    const std::string cmd = "'" + program + "' " + args + " >'" + o.string() + "' 2>'" + e.string() + "'";
    const int code = exit_code(std::system(cmd.c_str()));
    if (out) *out = slurp(o);
    if (err) *err = slurp(e);
    return code;
}

}  // namespace tessera::clitest
