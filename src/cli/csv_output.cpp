#include "cli/csv_output.hpp"

#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <iostream>
#include <stdexcept>
#include <system_error>

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

std::string reason() { return std::strerror(errno); }

// Appends `part` to `into`.
bool append_file(std::FILE* into, const fs::path& part) {
    std::FILE* in = std::fopen(part.c_str(), "rb");
    if (!in) return false;
    char buf[1 << 16];
    std::size_t n;
    bool ok = true;
    while ((n = std::fread(buf, 1, sizeof buf, in)) > 0) ok = ok && std::fwrite(buf, 1, n, into) == n;
    ok = ok && !std::ferror(in);
    std::fclose(in);
    return ok;
}

}  // namespace

CsvOutput::CsvOutput(fs::path file, std::string header, int replicates)
    : file_(std::move(file)), header_(std::move(header)) {
    if (replicates == 1) {
        parts_.push_back(file_);
    } else {
        for (int r = 0; r < replicates; ++r) {
            parts_.push_back(file_.parent_path() / (file_.stem().string() + ".replicate" + std::to_string(r) + ".part"));
        }
    }
}

CsvOutput::~CsvOutput() { close(); }

std::uint64_t CsvOutput::initial_bytes() const { return parts_.size() == 1 ? header_.size() : 0; }

bool CsvOutput::parts_exist() const {
    std::error_code ec;
    for (const fs::path& p : parts_) {
        if (!fs::exists(p, ec)) return false;
    }
    return true;
}

bool CsvOutput::open() {
    for (const fs::path& p : parts_) {
        std::FILE* h = std::fopen(p.c_str(), "wb");
        if (!h) {
            std::cerr << "error: " << p.string() << ": cannot create the file (" << reason() << ")\n";
            return false;
        }
        handles_.push_back(h);
    }
    if (parts_.size() == 1) {
        try {
            write(0, header_);
        } catch (const std::runtime_error& e) {
            std::cerr << "error: " << e.what() << "\n";
            return false;
        }
    }
    return true;
}

bool CsvOutput::reopen(const std::vector<std::uint64_t>& bytes) {
    for (std::size_t r = 0; r < parts_.size(); ++r) {
        const fs::path& p = parts_[r];
        std::error_code ec;
        const std::uintmax_t size = fs::file_size(p, ec);
        if (ec) {
            std::cerr << "error: " << p.string() << ": cannot resume: " << ec.message()
                      << " (the checkpoint counts " << bytes[r] << " bytes written to it)\n";
            return false;
        }
        if (size < bytes[r]) {
            std::cerr << "error: " << p.string() << ": cannot resume: it holds " << size << " bytes, but the checkpoint "
                      << "counts " << bytes[r] << " written (the file was cut or replaced)\n";
            return false;
        }
        // Rows written after the checkpoint are written again, identically, by the resumed run.
        fs::resize_file(p, bytes[r], ec);
        std::FILE* h = ec ? nullptr : std::fopen(p.c_str(), "ab");
        if (!h) {
            std::cerr << "error: " << p.string() << ": cannot reopen it to resume ("
                      << (ec ? ec.message() : reason()) << ")\n";
            return false;
        }
        handles_.push_back(h);
    }
    return true;
}

void CsvOutput::write(int replicate, const std::string& text) {
    std::FILE* h = handles_[static_cast<std::size_t>(replicate)];
    errno = 0;
    if (std::fwrite(text.data(), 1, text.size(), h) != text.size() || std::fflush(h) != 0) {
        throw std::runtime_error(part(replicate).string() + ": cannot write (" +
                                 (errno ? reason() : std::string("write error")) + ")");
    }
}

std::uint64_t CsvOutput::sync(int replicate) {
    std::FILE* h = handles_[static_cast<std::size_t>(replicate)];
    if (std::fflush(h) != 0 || ::fsync(::fileno(h)) != 0) {
        throw std::runtime_error(part(replicate).string() + ": cannot flush to disk (" + reason() + ")");
    }
    const long at = std::ftell(h);
    if (at < 0) throw std::runtime_error(part(replicate).string() + ": cannot tell its length (" + reason() + ")");
    return static_cast<std::uint64_t>(at);
}

void CsvOutput::close() {
    for (std::FILE* h : handles_) std::fclose(h);
    handles_.clear();
}

bool CsvOutput::finish() {
    bool ok = true;
    for (std::FILE* h : handles_) ok = std::fflush(h) == 0 && ::fsync(::fileno(h)) == 0 && ok;
    close();
    if (!ok) {
        std::cerr << "error: cannot flush " << file_.string() << " to disk (" << reason() << ")\n";
        return false;
    }
    if (parts_.size() == 1) return true;
    const fs::path joined = file_.string() + ".tmp";
    std::FILE* all = std::fopen(joined.c_str(), "wb");
    ok = all != nullptr && std::fputs(header_.c_str(), all) >= 0;
    for (const fs::path& part : parts_) ok = ok && append_file(all, part);
    if (all) ok = std::fflush(all) == 0 && ::fsync(::fileno(all)) == 0 && std::fclose(all) == 0 && ok;
    ok = ok && std::rename(joined.c_str(), file_.c_str()) == 0;
    if (!ok) {
        std::cerr << "error: " << file_.string() << ": cannot write (" << reason()
                  << "); the replicates' part files are kept: 'tessera resume' joins them again\n";
        return false;
    }
    std::error_code ec;
    for (const fs::path& part : parts_) fs::remove(part, ec);
    return true;
}

}  // namespace tessera::cli
