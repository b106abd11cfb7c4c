// A CSV output of a run (series.csv, habitat_series.csv). With one replicate it streams
// straight into its file; with several, each replicate streams into a part file of its own
// (series.replicate<r>.part), joined in replicate order at the end, so the file never
// depends on scheduling. Every write is checked: a full disk stops the run with a message.
#pragma once

#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

namespace tessera::cli {

class CsvOutput {
public:
    CsvOutput(std::filesystem::path file, std::string header, int replicates);
    ~CsvOutput();
    CsvOutput(const CsvOutput&) = delete;
    CsvOutput& operator=(const CsvOutput&) = delete;

    // A fresh run: creates (truncates) every part and writes the header. False (with a
    // message on stderr) when a file cannot be created.
    bool open();
    // A resumed run: cuts each part back to `bytes[r]` (what the checkpoint recorded) and
    // appends from there. False with a message when a part is missing or shorter.
    bool reopen(const std::vector<std::uint64_t>& bytes);

    // What replicate r's part holds before anything is written: the header, or nothing.
    std::uint64_t initial_bytes() const;
    const std::filesystem::path& part(int replicate) const { return parts_[static_cast<std::size_t>(replicate)]; }
    bool parts_exist() const;

    // Appends to replicate r's part and flushes; throws std::runtime_error naming the file.
    void write(int replicate, const std::string& text);
    // Flushes and fsyncs replicate r's part and returns its length in bytes.
    std::uint64_t sync(int replicate);

    // Closes the files; with several replicates joins the parts into the file (written
    // beside it, fsync'ed and renamed, the parts removed only then, so a crash during the
    // join leaves the parts to join again). False with a message when writing fails.
    bool finish();
    void close();

private:
    std::filesystem::path file_;
    std::string header_;
    std::vector<std::filesystem::path> parts_;
    std::vector<std::FILE*> handles_;
};

}  // namespace tessera::cli
