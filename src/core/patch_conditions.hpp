// What a patch's habitat class (with any schedule in force) means for its local events.
#pragma once

namespace tessera {

struct PatchConditions {
    double capacity = 1.0;       // K_p = K * capacity; 0 is a wall
    double stress = 0.0;         // extra death rate of active cells
    double resuscitation = 1.0;  // multiplier of sigma
    double permeability = 1.0;   // multiplier of the migration rate out of the patch
};

}  // namespace tessera
