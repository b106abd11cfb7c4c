// A small reader for the comma-separated tables tessera writes (series.csv, ensemble.csv,
// points.csv, ...): a header line naming the columns, then rows of plain fields (no quoting;
// our writers never quote). Every problem is reported as `file:line: column NAME: what is
// wrong; what is expected`, so a user can find the cell that is at fault.
#pragma once

#include <cstddef>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

namespace tessera {

class CsvError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

class CsvTable {
public:
    // Reads the whole file. Throws CsvError when it cannot be opened, has no header, or a
    // row has a different number of fields than the header. Blank lines are skipped.
    static CsvTable read(const std::string& path);
    // The same from text already in memory; `path` only names it in messages.
    static CsvTable parse(const std::string& text, const std::string& path);

    const std::string& path() const { return path_; }
    const std::vector<std::string>& header() const { return header_; }
    std::size_t rows() const { return cells_.size(); }

    std::optional<std::size_t> find(const std::string& column) const;
    // The column's index; throws CsvError naming the file and the columns it has.
    std::size_t column(const std::string& name) const;
    // Throws CsvError naming every required column the header lacks.
    void require(const std::vector<std::string>& names) const;

    const std::string& text(std::size_t row, std::size_t column) const { return cells_[row][column]; }
    // The field as a finite-or-infinite double (nan is rejected); throws CsvError with file,
    // line and column name otherwise.
    double number(std::size_t row, std::size_t column) const;
    // The field as an integer >= 0.
    long long whole(std::size_t row, std::size_t column) const;
    std::size_t line(std::size_t row) const { return lines_[row]; }
    // "file:line: column NAME: " for messages of the caller's own checks.
    std::string where(std::size_t row, std::size_t column) const;

private:
    std::string path_;
    std::vector<std::string> header_;
    std::vector<std::vector<std::string>> cells_;
    std::vector<std::size_t> lines_;  // 1-based line of each row in the file
};

}  // namespace tessera
