// Numbers in text outputs, one spelling for every file (series.csv, limit_series.csv, the
// sweep tables, trait names like "2:4"). Pure string formatting, so the core and the study
// layer use it too.
#pragma once

#include <string>

namespace tessera {

// Shortest text that reads back to the same double (trait levels, counts, exponents).
void append_number(std::string& out, double v);
std::string shortest_text(double v);  // the same, as a string

// Times with 12 significant digits: output times are multiples of an interval, and the last
// bits of j * every (or of t / ln K) are rounding, not information.
void append_time(std::string& out, double t);

}  // namespace tessera
