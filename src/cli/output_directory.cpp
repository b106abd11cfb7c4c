#include "cli/output_directory.hpp"

#include <fstream>
#include <iostream>
#include <system_error>

namespace fs = std::filesystem;

namespace tessera::cli {

bool holds_outputs(const fs::path& dir, const std::vector<std::string>& markers) {
    for (const std::string& m : markers) {
        if (fs::exists(dir / m)) return true;
    }
    return false;
}

bool prepare_directory(const fs::path& dir, bool overwrite, const std::vector<std::string>& markers) {
    std::error_code ec;
    if (fs::exists(dir, ec) && !fs::is_directory(dir, ec)) {
        std::cerr << "error: --out " << dir.string() << ": exists and is not a directory\n";
        return false;
    }
    if (holds_outputs(dir, markers) && !overwrite) {
        std::cerr << "error: --out " << dir.string()
                  << ": already holds a run or other tessera outputs (series.csv, checkpoint.bin, ...); choose another "
                     "directory, continue an interrupted run with 'tessera resume "
                  << dir.string() << "', or add --overwrite\n";
        return false;
    }
    fs::create_directories(dir, ec);
    if (ec) {
        std::cerr << "error: --out " << dir.string() << ": cannot create the directory: " << ec.message() << "\n";
        return false;
    }
    const fs::path probe = dir / ".tessera-write-test";
    {
        std::ofstream test(probe);
        test << "ok";
        test.flush();
        if (!test) {
            std::cerr << "error: --out " << dir.string() << ": the directory is not writable\n";
            return false;
        }
    }
    fs::remove(probe, ec);
    // An old run's checkpoint must never be resumed over this command's outputs.
    fs::remove(dir / "checkpoint.bin", ec);
    return true;
}

bool write_text(const fs::path& file, const std::string& text) {
    std::ofstream out(file, std::ios::binary);
    out << text;
    out.close();
    return static_cast<bool>(out);
}

}  // namespace tessera::cli
