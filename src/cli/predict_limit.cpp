// STUB (session 3 skeleton): --model limit is being written.
#include <iostream>

#include "cli/predict_models.hpp"

namespace tessera::cli {

int predict_limit_into(const Scenario&, const std::filesystem::path&, bool) {
    std::cerr << "tessera predict --model limit: not built yet\n";
    return 1;
}

}  // namespace tessera::cli
