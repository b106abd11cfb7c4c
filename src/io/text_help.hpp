// Small text helpers shared by the scenario loader and writer: "did you mean" suggestions,
// lists for messages, and numbers written so that they read back to the same double.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace tessera {

// Edit distance (insertions, deletions, substitutions and swaps of neighbours), ignoring case.
int edit_distance(std::string_view a, std::string_view b);

// The candidate closest to `word`, or "" when none is close enough to be a likely typo.
std::string closest_match(std::string_view word, const std::vector<std::string>& candidates);

// "a, b, c"
std::string join_list(const std::vector<std::string>& items, std::string_view separator = ", ");

// The shortest decimal text that reads back to exactly `v` ("inf" and "-inf" for infinities).
// Whole numbers keep no fraction ("4", "1e+06"); see toml_number for TOML output.
std::string format_number(double v);

// format_number, made a TOML float in every case ("4.0", "1e+06", "inf").
std::string toml_number(double v);

// A TOML basic string literal, quoted and escaped.
std::string toml_string(std::string_view s);

}  // namespace tessera
