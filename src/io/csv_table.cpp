#include "io/csv_table.hpp"

#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <sstream>

namespace tessera {

namespace {

std::vector<std::string> split(const std::string& line) {
    std::vector<std::string> fields;
    std::size_t start = 0;
    for (;;) {
        const std::size_t comma = line.find(',', start);
        fields.push_back(line.substr(start, comma == std::string::npos ? std::string::npos : comma - start));
        if (comma == std::string::npos) break;
        start = comma + 1;
    }
    return fields;
}

}  // namespace

CsvTable CsvTable::read(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw CsvError(path + ": cannot be opened for reading");
    std::ostringstream text;
    text << in.rdbuf();
    return parse(text.str(), path);
}

CsvTable CsvTable::parse(const std::string& text, const std::string& path) {
    CsvTable t;
    t.path_ = path;
    std::size_t pos = 0, line_no = 0;
    while (pos <= text.size()) {
        std::size_t end = text.find('\n', pos);
        if (end == std::string::npos) end = text.size();
        std::string line = text.substr(pos, end - pos);
        pos = end + 1;
        ++line_no;
        if (!line.empty() && line.back() == '\r') line.pop_back();
        if (line.find_first_not_of(" \t") == std::string::npos) {
            if (end == text.size()) break;
            continue;
        }
        std::vector<std::string> fields = split(line);
        if (t.header_.empty()) {
            t.header_ = std::move(fields);
        } else if (fields.size() != t.header_.size()) {
            throw CsvError(path + ":" + std::to_string(line_no) + ": " + std::to_string(fields.size()) +
                           " fields; the header has " + std::to_string(t.header_.size()) + " columns");
        } else {
            t.cells_.push_back(std::move(fields));
            t.lines_.push_back(line_no);
        }
        if (end == text.size()) break;
    }
    if (t.header_.empty()) throw CsvError(path + ": empty file; expected a header line naming the columns");
    return t;
}

std::optional<std::size_t> CsvTable::find(const std::string& column) const {
    for (std::size_t i = 0; i < header_.size(); ++i)
        if (header_[i] == column) return i;
    return std::nullopt;
}

std::size_t CsvTable::column(const std::string& name) const {
    if (const auto i = find(name)) return *i;
    require({name});
    return 0;  // not reached: require throws
}

void CsvTable::require(const std::vector<std::string>& names) const {
    std::string missing;
    for (const auto& n : names)
        if (!find(n)) missing += (missing.empty() ? "" : ", ") + n;
    if (missing.empty()) return;
    std::string have;
    for (const auto& h : header_) have += (have.empty() ? "" : ",") + h;
    throw CsvError(path_ + ":1: missing column" + (missing.find(',') != std::string::npos ? "s " : " ") + missing +
                   "; the header is " + have);
}

std::string CsvTable::where(std::size_t row, std::size_t column) const {
    return path_ + ":" + std::to_string(lines_[row]) + ": column " + header_[column] + ": ";
}

double CsvTable::number(std::size_t row, std::size_t column) const {
    const std::string& s = cells_[row][column];
    char* end = nullptr;
    errno = 0;
    const double v = s.empty() ? 0.0 : std::strtod(s.c_str(), &end);
    if (s.empty() || end != s.c_str() + s.size() || std::isnan(v))
        throw CsvError(where(row, column) + "\"" + s + "\" is not a number");
    return v;
}

long long CsvTable::whole(std::size_t row, std::size_t column) const {
    const std::string& s = cells_[row][column];
    char* end = nullptr;
    errno = 0;
    const long long v = s.empty() ? 0 : std::strtoll(s.c_str(), &end, 10);
    if (s.empty() || end != s.c_str() + s.size() || errno != 0 || v < 0)
        throw CsvError(where(row, column) + "\"" + s + "\" is not a whole number >= 0");
    return v;
}

}  // namespace tessera
