// Motion of the exponents between events (model.md section 7), exact: every class's exponent
// is affine in t / ln K until the next event. A class above its floor moves at its growth
// rate (per unit plain time = slope on the t / ln K scale); on its floor at the larger of its
// growth rate and the floor's slope; at 0 with no source above 0 it is extinct and stays.
#pragma once

#include <vector>

#include "theory/limit_sources.hpp"

namespace tessera {

struct MotionSystem {
    std::vector<double> growth;                       // per class
    std::vector<std::vector<FloorSource>> sources;    // per class
    double contact = 1e-12;                           // exponents closer than this are equal
};

// Value of a floor source for exponents `beta` (per class).
double source_value(const FloorSource& f, const std::vector<double>& beta);
// The floor of every class (-infinity when it has none).
std::vector<double> floors(const MotionSystem& m, const std::vector<double>& beta);
// Raises every class to its floor (a source acting at order one takes no time on the
// t / ln K scale), repeated until nothing moves.
void raise_to_floors(const MotionSystem& m, std::vector<double>& beta);
// Slope of every class's exponent now.
std::vector<double> velocities(const MotionSystem& m, const std::vector<double>& beta);
// Whether class u sits on a floor set by a source in which class w takes part.
bool follows(const MotionSystem& m, const std::vector<double>& beta, int u, int w);

struct MotionEvent {
    enum Kind { none, reach_one, reach_zero, meet_floor } kind = none;
    double dt = 0.0;  // t / ln K until it
    int unit = -1;    // the class
};
// The first event after now: a class reaching 1 (rising), reaching 0 (falling), or a floor
// catching up with a class (also: a source rising to 0 under an extinct class).
MotionEvent next_motion_event(const MotionSystem& m, const std::vector<double>& beta, const std::vector<double>& v);

}  // namespace tessera
