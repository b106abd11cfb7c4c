#include "render/field_view.hpp"

namespace tessera {

namespace {

struct Entry {
    FieldView view;
    std::string_view name;
    std::string_view title;
};

constexpr Entry entries[field_view_count] = {
    {FieldView::dominant_trait, "trait", "Dominant trait"},
    {FieldView::dormant_fraction, "dormant", "Dormant fraction"},
    {FieldView::mean_transfer, "transfer", "Mean transfer ability"},
    {FieldView::total_exponent, "exponent", "Population exponent"},
    {FieldView::habitat, "habitat", "Habitat class"},
    {FieldView::stress, "stress", "Stress now"},
};

}  // namespace

std::string_view view_name(FieldView v) { return entries[static_cast<int>(v)].name; }
std::string_view view_title(FieldView v) { return entries[static_cast<int>(v)].title; }

std::optional<FieldView> view_from_name(std::string_view name) {
    for (const Entry& e : entries) {
        if (e.name == name) return e.view;
    }
    return std::nullopt;
}

std::string view_names() {
    std::string all;
    for (const Entry& e : entries) {
        if (!all.empty()) all += ", ";
        all += e.name;
    }
    return all;
}

FieldView next_view(FieldView v) { return static_cast<FieldView>((static_cast<int>(v) + 1) % field_view_count); }

}  // namespace tessera
