// libFuzzer target: the checkpoint reader (decode_checkpoint) on arbitrary bytes.
//
// A checksum guards every checkpoint, so random bytes stop at it. The first input byte
// chooses: odd, the rest is a payload that gets a right header and checksum around it, which
// takes the fuzzer into the decoder proper; even, the rest is the whole file as is (header,
// length and checksum checks). The contract: a Checkpoint or CheckpointError, nothing else.
//
// Seeds: with TESSERA_FUZZ_WRITE_SEEDS=DIR set, the target writes a few valid checkpoints
// (made with encode_checkpoint) into DIR and exits; tests/fuzz/corpus/checkpoint holds them.
#include <cstring>
#include <string>

#include "core/scenario.hpp"
#include "fuzz_support.hpp"
#include "io/checkpoint.hpp"
#include "io/checksum.hpp"

namespace {

void put_le(std::string& out, std::uint64_t v, int bytes) {
    for (int i = 0; i < bytes; ++i) out.push_back(static_cast<char>((v >> (8 * i)) & 0xff));
}

std::string wrap(std::string_view payload) {
    std::string b = "TESSCKPT";
    put_le(b, tessera::checkpoint_format_version, 4);
    put_le(b, 0, 4);
    put_le(b, payload.size(), 8);
    b.append(payload);
    put_le(b, tessera::fnv1a64(b), 8);
    return b;
}

void write_seeds(const std::string& dir) {
    using namespace tessera;
    auto save = [&](const std::string& name, const std::string& bytes, bool as_payload) {
        std::string out;
        if (as_payload) {
            // The payload alone, behind the odd mode byte (the target wraps it again).
            const std::size_t header = 24;
            out = "\x01" + bytes.substr(header, bytes.size() - header - 8);
        } else {
            out = std::string("\x00", 1) + bytes;
        }
        std::ofstream(std::filesystem::path(dir) / name, std::ios::binary) << out;
    };
    ReplicateCheckpoint r0;
    r0.replicate = 0;
    r0.stage = ReplicateCheckpoint::Stage::running;
    r0.state.time = 0.25;
    r0.state.step = 25;
    r0.state.active = {5, 0, 3, 1, 0, 0};
    r0.state.dormant = {0, 1, 0, 0, 0, 2};
    r0.state.patch_counts.resize(2);
    r0.state.patch_counts[0].births = 7;
    r0.state.patch_counts[1].deaths = 3;
    r0.state.lost = 1;
    r0.state.migrants = 4;
    r0.state.class_conditions.resize(1);
    r0.outputs.series_bytes = 120;
    ReplicateCheckpoint r1;
    r1.replicate = 1;
    const std::string scenario = "[lattice]\nwidth = 2\n[traits]\ndormancy = { max = 1.0, levels = 3 }\n"
                                 "transfer = { max = 1.0, levels = 1 }\n";
    const std::string two = encode_checkpoint(scenario, {0, 0}, {encode_replicate(r0), encode_replicate(r1)});
    const std::string one = encode_checkpoint(scenario, {0, 0}, {encode_replicate(r0)});
    save("valid_two_replicates", two, false);
    save("valid_one_replicate", one, false);
    save("payload_two_replicates", two, true);
    save("payload_one_replicate", one, true);
    std::string flipped = one;
    flipped[flipped.size() / 2] ^= 0x10;
    save("bit_flipped", flipped, false);
    save("truncated", one.substr(0, one.size() - 9), false);
}

}  // namespace

extern "C" int LLVMFuzzerInitialize(int*, char***) {
    if (const char* dir = std::getenv("TESSERA_FUZZ_WRITE_SEEDS")) {
        std::filesystem::create_directories(dir);
        write_seeds(dir);
        std::exit(0);
    }
    return 0;
}

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    if (size == 0) return 0;
    const std::string_view rest(reinterpret_cast<const char*>(data) + 1, size - 1);
    const std::string bytes = (data[0] & 1) ? wrap(rest) : std::string(rest);
    try {
        const tessera::Checkpoint c = tessera::decode_checkpoint(bytes, "fuzz.checkpoint");
        (void)c;
    } catch (const tessera::CheckpointError&) {
    }
    return 0;
}
