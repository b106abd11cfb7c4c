// libFuzzer target: the text habitat map reader on arbitrary bytes.
#include "fuzz_support.hpp"
#include "io/habitat_map.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    static const std::vector<tessera::Habitat> classes = tessera::fuzz::habitats();
    const std::string path = tessera::fuzz::write_file("map.txt", data, size);
    const tessera::HabitatMap m = tessera::read_text_map(path, classes);
    tessera::fuzz::check_map(m, classes.size());
    return 0;
}
