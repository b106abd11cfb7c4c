#include "io/checkpoint.hpp"

#include <fcntl.h>
#include <unistd.h>

#include <bit>
#include <cerrno>
#include <cstring>
#include <fstream>
#include <iterator>

#include "core/count_limit.hpp"
#include "io/checksum.hpp"
#include "version.hpp"

namespace tessera {

namespace {

constexpr char magic[8] = {'T', 'E', 'S', 'S', 'C', 'K', 'P', 'T'};
constexpr std::size_t header_bytes = 8 + 4 + 4 + 8;  // magic, version, reserved, payload length
constexpr std::size_t checksum_bytes = 8;

// Explicit little-endian encoding, so a checkpoint moves between machines.
class Encoder {
public:
    void u8(std::uint8_t v) { out_.push_back(static_cast<char>(v)); }
    void u16(std::uint16_t v) { put(v, 2); }
    void u32(std::uint32_t v) { put(v, 4); }
    void u64(std::uint64_t v) { put(v, 8); }
    void i64(std::int64_t v) { put(static_cast<std::uint64_t>(v), 8); }
    void f64(double v) { put(std::bit_cast<std::uint64_t>(v), 8); }  // the exact bits
    void text(const std::string& s) {
        u64(s.size());
        out_ += s;
    }
    std::string& bytes() { return out_; }

private:
    void put(std::uint64_t v, int n) {
        for (int i = 0; i < n; ++i) out_.push_back(static_cast<char>((v >> (8 * i)) & 0xff));
    }
    std::string out_;
};

class Decoder {
public:
    Decoder(const std::string& bytes, std::size_t begin, std::size_t end, const std::string& name)
        : b_(bytes), at_(begin), end_(end), name_(name) {}

    std::uint8_t u8(const char* what) { return static_cast<std::uint8_t>(get(1, what)); }
    std::uint16_t u16(const char* what) { return static_cast<std::uint16_t>(get(2, what)); }
    std::uint32_t u32(const char* what) { return static_cast<std::uint32_t>(get(4, what)); }
    std::uint64_t u64(const char* what) { return get(8, what); }
    std::int64_t i64(const char* what) { return static_cast<std::int64_t>(get(8, what)); }
    double f64(const char* what) { return std::bit_cast<double>(get(8, what)); }
    std::string text(const char* what) {
        const std::uint64_t n = count(1, what);
        std::string s = b_.substr(at_, n);
        at_ += n;
        return s;
    }
    // A count of items of `item_bytes` each that must fit in what is left: a corrupt count
    // is reported, never allocated.
    std::uint64_t count(std::uint64_t item_bytes, const char* what) {
        const std::uint64_t n = u64(what);
        if (n > (end_ - at_) / item_bytes) fail(std::string(what) + " claims " + std::to_string(n) + " items, more than the file holds");
        return n;
    }
    bool done() const { return at_ == end_; }
    std::size_t at() const { return at_; }
    [[noreturn]] void fail(const std::string& what) const {
        throw CheckpointError(name_ + ": malformed checkpoint at byte " + std::to_string(at_) + ": " + what +
                              "; the file cannot be used (start the run again, or restore the file from a copy)");
    }

private:
    std::uint64_t get(int n, const char* what) {
        if (end_ - at_ < static_cast<std::size_t>(n)) fail(std::string("ends while reading ") + what);
        std::uint64_t v = 0;
        for (int i = 0; i < n; ++i) v |= std::uint64_t{static_cast<unsigned char>(b_[at_ + i])} << (8 * i);
        at_ += static_cast<std::size_t>(n);
        return v;
    }
    const std::string& b_;
    std::size_t at_;
    std::size_t end_;
    const std::string& name_;
};

std::uint64_t read_le(const std::string& b, std::size_t at, int n) {
    std::uint64_t v = 0;
    for (int i = 0; i < n; ++i) v |= std::uint64_t{static_cast<unsigned char>(b[at + i])} << (8 * i);
    return v;
}

void encode_counts(Encoder& e, const EventCounts& c) {
    for (std::uint64_t v : {c.births, c.mutations, c.deaths, c.competition_deaths, c.dormancies, c.dormant_deaths,
                            c.resuscitations, c.conjugations})
        e.u64(v);
}

EventCounts decode_counts(Decoder& d) {
    EventCounts c;
    for (std::uint64_t* v : {&c.births, &c.mutations, &c.deaths, &c.competition_deaths, &c.dormancies,
                             &c.dormant_deaths, &c.resuscitations, &c.conjugations})
        *v = d.u64("event tallies");
    return c;
}

ReplicateCheckpoint decode_replicate(Decoder& d) {
    ReplicateCheckpoint r;
    r.replicate = d.u32("replicate number");
    const std::uint8_t stage = d.u8("stage");
    if (stage > 2) d.fail("stage is " + std::to_string(stage) + ", not 0, 1 or 2");
    r.stage = static_cast<ReplicateCheckpoint::Stage>(stage);
    Engine::State& s = r.state;
    s.step = d.u64("step number");
    s.time = d.f64("time");
    s.lost = d.u64("lost cells");
    s.migrants = d.u64("migrants");
    for (auto* v : {&s.active, &s.dormant}) {
        v->resize(d.count(8, "counts"));
        for (std::int64_t& x : *v) {
            x = d.i64("counts");
            // A count no run can hold: refused here, never handed to the engine.
            if (x < 0 || x > cell_limit)
                d.fail("a cell count of " + std::to_string(x) + ", outside 0 .. 2^62 (" + std::to_string(cell_limit) + ")");
        }
    }
    if (s.active.size() != s.dormant.size()) d.fail("active and dormant counts differ in size");
    s.patch_counts.resize(d.count(64, "per-patch event tallies"));
    for (EventCounts& c : s.patch_counts) c = decode_counts(d);
    s.class_conditions.resize(d.count(32, "habitat conditions"));
    for (PatchConditions& c : s.class_conditions) {
        c.capacity = d.f64("habitat conditions");
        c.stress = d.f64("habitat conditions");
        c.resuscitation = d.f64("habitat conditions");
        c.permeability = d.f64("habitat conditions");
    }
    OutputPositions& o = r.outputs;
    o.series_bytes = d.u64("output positions");
    o.habitat_series_bytes = d.u64("output positions");
    o.snapshots = d.u64("output positions");
    o.frames = d.u64("output positions");
    return r;
}

}  // namespace

std::string encode_replicate(const ReplicateCheckpoint& r) {
    Encoder e;
    e.u32(r.replicate);
    e.u8(static_cast<std::uint8_t>(r.stage));
    const Engine::State& s = r.state;
    e.u64(s.step);
    e.f64(s.time);
    e.u64(s.lost);
    e.u64(s.migrants);
    for (const auto* v : {&s.active, &s.dormant}) {
        e.u64(v->size());
        for (std::int64_t x : *v) e.i64(x);
    }
    e.u64(s.patch_counts.size());
    for (const EventCounts& c : s.patch_counts) encode_counts(e, c);
    e.u64(s.class_conditions.size());
    for (const PatchConditions& c : s.class_conditions) {
        e.f64(c.capacity);
        e.f64(c.stress);
        e.f64(c.resuscitation);
        e.f64(c.permeability);
    }
    e.u64(r.outputs.series_bytes);
    e.u64(r.outputs.habitat_series_bytes);
    e.u64(r.outputs.snapshots);
    e.u64(r.outputs.frames);
    return std::move(e.bytes());
}

std::string encode_checkpoint(const std::string& scenario_text, const std::vector<std::uint16_t>& habitat_of_patch,
                              const std::vector<std::string>& sections) {
    Encoder payload;
    payload.text(version);
    payload.text(build_id);
    payload.text(scenario_text);
    payload.u64(habitat_of_patch.size());
    for (std::uint16_t h : habitat_of_patch) payload.u16(h);
    payload.u64(sections.size());
    std::string body = std::move(payload.bytes());
    for (const std::string& s : sections) body += s;

    Encoder file;
    file.bytes().append(magic, sizeof magic);
    file.u32(checkpoint_format_version);
    file.u32(0);
    file.u64(body.size());
    file.bytes() += body;
    file.u64(fnv1a64(file.bytes()));
    return std::move(file.bytes());
}

void write_file_atomically(const std::filesystem::path& path, const std::string& bytes) {
    const std::filesystem::path tmp = path.string() + ".tmp";
    auto fail = [&](const std::filesystem::path& p, const char* doing) {
        throw std::runtime_error(p.string() + ": cannot " + doing + " (" + std::strerror(errno) + ")");
    };
    const int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
    if (fd < 0) fail(tmp, "create the file");
    std::size_t done = 0;
    while (done < bytes.size()) {
        const ssize_t n = ::write(fd, bytes.data() + done, bytes.size() - done);
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) {
            const int saved = errno;
            ::close(fd);
            ::unlink(tmp.c_str());
            errno = saved;
            fail(tmp, "write");
        }
        done += static_cast<std::size_t>(n);
    }
    if (::fsync(fd) != 0) {
        const int saved = errno;
        ::close(fd);
        ::unlink(tmp.c_str());
        errno = saved;
        fail(tmp, "flush to disk");
    }
    if (::close(fd) != 0) fail(tmp, "close");
    if (std::rename(tmp.c_str(), path.c_str()) != 0) fail(path, "replace");
    // The rename itself is durable only once the directory is.
    const std::filesystem::path dir = path.has_parent_path() ? path.parent_path() : ".";
    const int dfd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (dfd >= 0) {
        ::fsync(dfd);
        ::close(dfd);
    }
}

Checkpoint decode_checkpoint(const std::string& b, const std::string& name) {
    const std::string retry = "; the file cannot be used (start the run again, or restore the file from a copy)";
    if (b.size() < sizeof magic || std::memcmp(b.data(), magic, sizeof magic) != 0) {
        throw CheckpointError(name + ": not a tessera checkpoint (it does not start with \"TESSCKPT\")");
    }
    if (b.size() < header_bytes + checksum_bytes) {
        throw CheckpointError(name + ": truncated: " + std::to_string(b.size()) + " bytes, shorter than a header" + retry);
    }
    const auto format = static_cast<std::uint32_t>(read_le(b, 8, 4));
    if (format != checkpoint_format_version) {
        throw CheckpointError(name + ": written in checkpoint format version " + std::to_string(format) +
                              ", but this tessera (" + version + ") reads version " +
                              std::to_string(checkpoint_format_version) +
                              " only; resume it with the tessera version that wrote it");
    }
    const std::uint64_t payload = read_le(b, 16, 8);
    if (payload > b.size() || b.size() - header_bytes - checksum_bytes != payload) {
        throw CheckpointError(name + ": truncated or padded: " + std::to_string(b.size()) + " bytes, expected " +
                              std::to_string(payload + header_bytes + checksum_bytes) + retry);
    }
    const std::size_t end = header_bytes + payload;
    if (fnv1a64(std::string_view(b).substr(0, end)) != read_le(b, end, 8)) {
        throw CheckpointError(name + ": corrupted: the checksum does not match the contents" + retry);
    }
    Decoder d(b, header_bytes, end, name);
    Checkpoint c;
    c.program_version = d.text("program version");
    c.build_id = d.text("build id");
    c.scenario_text = d.text("scenario");
    c.habitat_of_patch.resize(d.count(2, "habitat map"));
    for (std::uint16_t& h : c.habitat_of_patch) h = d.u16("habitat map");
    const std::uint64_t replicates = d.count(1, "replicates");
    if (replicates == 0) d.fail("no replicates");
    for (std::uint64_t r = 0; r < replicates; ++r) {
        c.replicates.push_back(decode_replicate(d));
        if (c.replicates.back().replicate != r) d.fail("replicate sections out of order");
    }
    if (!d.done()) d.fail("unread bytes after the last replicate");
    return c;
}

Checkpoint read_checkpoint(const std::filesystem::path& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) {
        throw CheckpointError(path.string() + ": cannot open (" + std::strerror(errno) +
                              "); a run directory holds checkpoint.bin once its run has started");
    }
    std::string bytes((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    if (in.bad()) throw CheckpointError(path.string() + ": cannot read (" + std::strerror(errno) + ")");
    return decode_checkpoint(bytes, path.string());
}

}  // namespace tessera
