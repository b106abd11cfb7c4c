// Tallies of what happened, kept so that the books can be balanced:
// initial + born + immigrated - died - emigrated - lost = now.
#pragma once

#include <cstdint>

namespace tessera {

struct EventCounts {
    std::uint64_t births = 0;
    std::uint64_t mutations = 0;          // births whose offspring changed trait
    std::uint64_t deaths = 0;             // active cells: natural death and stress
    std::uint64_t competition_deaths = 0;
    std::uint64_t dormancies = 0;         // competition encounters that made a cell dormant
    std::uint64_t dormant_deaths = 0;
    std::uint64_t resuscitations = 0;
    std::uint64_t conjugations = 0;

    std::uint64_t events() const {
        return births + deaths + competition_deaths + dormancies + dormant_deaths +
               resuscitations + conjugations;
    }
    EventCounts& operator+=(const EventCounts& o) {
        births += o.births;
        mutations += o.mutations;
        deaths += o.deaths;
        competition_deaths += o.competition_deaths;
        dormancies += o.dormancies;
        dormant_deaths += o.dormant_deaths;
        resuscitations += o.resuscitations;
        conjugations += o.conjugations;
        return *this;
    }
};

}  // namespace tessera
