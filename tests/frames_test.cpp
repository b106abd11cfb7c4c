// Recorded frames equal rendered ones: frames written during a run (FrameRecorder as an
// observer) and frames drawn afterwards from fields.h5 (FieldsFile) are the same bytes.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>

#include "core/engine.hpp"
#include "io/fields_writer.hpp"
#include "render/fields_file.hpp"
#include "render/frame_recorder.hpp"

using namespace tessera;
namespace fs = std::filesystem;

namespace {

std::string bytes(const fs::path& file) {
    std::ifstream in(file, std::ios::binary);
    return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

class Both : public Observer {
public:
    Both(FieldsWriter& f, FrameRecorder& r) : fields_(f), frames_(r) {}
    void observe(const Engine& e, unsigned kinds) override {
        if (kinds & fields_output) fields_.append(e);
        frames_.observe(e, kinds);
    }

private:
    FieldsWriter& fields_;
    FrameRecorder& frames_;
};

}  // namespace

TEST_CASE("frames recorded during a run equal frames rendered from fields.h5") {
    Scenario sc;
    sc.K = 200;
    sc.width = 8;
    sc.height = 5;
    Habitat open, wall, treated;
    wall.name = "wall";
    wall.capacity = 0.0;
    treated.name = "treated";
    treated.colour = "#8fa8d8";
    sc.habitats = {open, wall, treated};
    sc.habitat_of_patch.assign(40, 0);
    for (int row = 0; row < 4; ++row) sc.habitat_of_patch[static_cast<std::size_t>(row) * 8 + 4] = 1;
    for (int row = 0; row < 5; ++row) sc.habitat_of_patch[static_cast<std::size_t>(row) * 8 + 7] = 2;
    Inoculum in;
    in.where = Inoculum::Where::rect;
    in.x0 = 0, in.y0 = 0, in.x1 = 1, in.y1 = 4;
    in.exponent = 1.0;
    sc.inocula = {in};
    Schedule pulse;
    pulse.habitat = "treated";
    pulse.start = 0.5;
    pulse.end = 1.0;
    pulse.stress = 2.0;
    sc.schedules = {pulse};
    sc.rates.migration = 0.5;
    sc.until = 2.0;
    sc.output_every = 0.5;
    sc.fields_every = 0.5;
    sc.frames_every = 0.5;
    sc.frame_scale = 6;
    sc.seed = 11;

    const fs::path dir = fs::temp_directory_path() / "tessera_frames_test";
    fs::remove_all(dir);
    fs::create_directories(dir);
    {
        Engine engine(sc);
        FieldsWriter fields((dir / "fields.h5").string(), engine);
        FrameRecorder recorder(dir / "frames", sc.frame_scale);
        Both both(fields, recorder);
        engine.run(both);
        CHECK(recorder.frames() == 5);  // t/lnK = 0, 0.5, 1, 1.5, 2
    }
    const FieldsFile file((dir / "fields.h5").string(), sc);
    REQUIRE(file.snapshots() == 5);
    FrameRecorder rendered(dir / "rendered", sc.frame_scale);
    for (std::uint64_t i = 0; i < file.snapshots(); ++i) rendered.write(file.read(i));
    for (std::uint64_t i = 0; i < 5; ++i) {
        const std::string name = frame_file_name(i);
        INFO(name);
        const std::string a = bytes(dir / "frames" / name), b = bytes(dir / "rendered" / name);
        CHECK(!a.empty());
        CHECK(a == b);
    }
    fs::remove_all(dir);
}
