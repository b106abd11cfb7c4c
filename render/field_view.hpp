// The quantities a lattice picture can show, their names on the command line and their
// titles in legends.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace tessera {

enum class FieldView {
    dominant_trait,    // the trait with most cells; brightness = how full the patch is
    dormant_fraction,  // dormant / (active + dormant)
    mean_transfer,     // mean transfer ability of all cells
    total_exponent,    // log(1 + N) / log K
    habitat,           // habitat class
    stress,            // stress in force now
};

inline constexpr int field_view_count = 6;

std::string_view view_name(FieldView v);   // "trait", "dormant", "transfer", "exponent", "habitat", "stress"
std::string_view view_title(FieldView v);  // legend title, e.g. "Dominant trait"
std::optional<FieldView> view_from_name(std::string_view name);
std::string view_names();                  // "trait, dormant, ..." for help texts
FieldView next_view(FieldView v);

}  // namespace tessera
