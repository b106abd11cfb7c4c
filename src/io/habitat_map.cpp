#include "io/habitat_map.hpp"

#include <SFML/Graphics/Image.hpp>
#include <SFML/System/Err.hpp>
#include <zlib.h>

#include <cmath>
#include <cstdio>
#include <cstring>
#include <optional>
#include <fstream>
#include <map>
#include <sstream>

#include "io/text_help.hpp"

namespace tessera {

namespace {

constexpr std::size_t max_reported = 20;  // a wrong map can have a million bad patches

std::string char_text(char c) {
    const auto u = static_cast<unsigned char>(c);
    if (u > ' ' && u < 127) return std::string("'") + c + "'";
    char buf[16];
    std::snprintf(buf, sizeof buf, "byte 0x%02x", u);
    return buf;
}

std::string colour_text(std::uint32_t rgb) {
    char buf[8];
    std::snprintf(buf, sizeof buf, "#%06x", rgb);
    return buf;
}

std::optional<std::uint32_t> parse_colour(const std::string& c) {
    if (c.size() != 7 || c[0] != '#') return std::nullopt;
    std::uint32_t v = 0;
    for (std::size_t i = 1; i < 7; ++i) {
        const char d = static_cast<char>(std::tolower(static_cast<unsigned char>(c[i])));
        if (d >= '0' && d <= '9') v = v * 16 + static_cast<std::uint32_t>(d - '0');
        else if (d >= 'a' && d <= 'f') v = v * 16 + static_cast<std::uint32_t>(d - 'a' + 10);
        else return std::nullopt;
    }
    return v;
}

// Why `bytes` is no PNG we accept, from its signature and IHDR chunk (PNG spec, sections 5.2
// and 11.2.2): nullopt when it may be decoded.
std::optional<std::string> png_header_problem(const std::string& bytes) {
    static constexpr unsigned char signature[8] = {0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'};
    if (bytes.empty()) return "the file is empty";
    if (bytes.size() < 8 || std::memcmp(bytes.data(), signature, 8) != 0)
        return "it is not a PNG file: it does not start with the PNG signature";
    if (bytes.size() < 24 || bytes.compare(12, 4, "IHDR") != 0) return "the PNG file is truncated before its IHDR header";
    if (bytes.size() < 33 || bytes.compare(8, 4, std::string("\0\0\0\x0d", 4)) != 0)
        return "the PNG file's IHDR header is damaged";
    auto be32 = [&](std::size_t at) {
        std::uint32_t v = 0;
        for (std::size_t i = 0; i < 4; ++i) v = (v << 8) | static_cast<unsigned char>(bytes[at + i]);
        return v;
    };
    const std::uint32_t w = be32(16), h = be32(20);
    if (w == 0 || h == 0) return "the PNG header says " + std::to_string(w) + " x " + std::to_string(h) + " pixels";
    if (static_cast<double>(w) * h > 1e8)
        return "the PNG header says " + std::to_string(w) + " x " + std::to_string(h) +
               " pixels, more than 1e8; at most 1e8 patches are accepted";
    // Every chunk (length, type, data, CRC) must lie inside the file: the decoder grows its
    // buffer to whatever length a chunk claims before reading it (a 79-byte file claiming a
    // 1.3 GB IDAT chunk; found by fuzz_image_map).
    std::string idat;
    for (std::size_t at = 8; at < bytes.size();) {
        if (bytes.size() - at < 12) return "the PNG file is damaged: it ends inside a chunk header";
        const std::uint32_t length = be32(at);
        const std::string type = bytes.substr(at + 4, 4);
        if (length > bytes.size() - at - 12)
            return "the PNG file is truncated or damaged: a chunk at byte " + std::to_string(at) + " claims " +
                   std::to_string(length) + " bytes, more than the file holds";
        if (type == "IDAT") idat.append(bytes, at + 8, length);
        at += 12 + static_cast<std::size_t>(length);
        if (type == "IEND") break;
    }
    // The compressed pixels must inflate to no more than the header's size allows. The
    // decoder SFML bundles reads zeros past the end of a damaged stream and can inflate them
    // for ever (a 79-byte 3 x 2 image took a gigabyte; found by fuzz_image_map).
    const int channels[7] = {1, 0, 3, 1, 2, 0, 4};  // by colour type (PNG spec 11.2.2)
    const int depth = static_cast<unsigned char>(bytes[24]), colour = static_cast<unsigned char>(bytes[25]);
    if (colour > 6 || channels[colour] == 0 || depth < 1 || depth > 16)
        return "the PNG header has colour type " + std::to_string(colour) + " and bit depth " + std::to_string(depth);
    const double row = 1.0 + std::ceil(static_cast<double>(w) * channels[colour] * depth / 8.0);
    // Interlaced images hold seven passes, each with its own filter bytes and row rounding.
    const double most = static_cast<double>(h) * row + (bytes[28] != 0 ? 8.0 * (static_cast<double>(h) + 8) * 2 : 0.0);
    z_stream z{};
    if (inflateInit(&z) != Z_OK) return "the PNG's image data cannot be checked (zlib)";
    z.next_in = reinterpret_cast<Bytef*>(idat.data());
    z.avail_in = static_cast<uInt>(idat.size());
    unsigned char scratch[1 << 14];
    double produced = 0;
    int rc = Z_OK;
    while (rc == Z_OK && produced <= most) {
        z.next_out = scratch;
        z.avail_out = sizeof scratch;
        rc = inflate(&z, Z_NO_FLUSH);
        produced += static_cast<double>(sizeof scratch - z.avail_out);
        if (rc == Z_BUF_ERROR || (rc == Z_OK && z.avail_in == 0 && z.avail_out != 0)) break;  // input used up
    }
    inflateEnd(&z);
    if (produced > most) return "the PNG's image data inflates to more than its header's size allows";
    if (rc != Z_STREAM_END) return "the PNG's image data is damaged or truncated";
    return std::nullopt;
}

}  // namespace

HabitatMap read_text_map(const std::string& path, const std::vector<Habitat>& habitats) {
    HabitatMap map;
    std::map<char, std::uint16_t> class_of;
    std::vector<std::string> accepted;
    for (std::size_t i = 0; i < habitats.size(); ++i) {
        const Habitat& h = habitats[i];
        if (h.symbol.size() != 1) continue;
        auto [it, fresh] = class_of.emplace(h.symbol[0], static_cast<std::uint16_t>(i));
        if (!fresh) {
            map.problems.push_back({0, "habitats " + toml_string(habitats[it->second].name) + " and " +
                                           toml_string(h.name) + " both have the symbol " + char_text(h.symbol[0]) +
                                           "; accepted: a distinct symbol for every habitat (give each [[habitat]] "
                                           "its own symbol)"});
        }
        accepted.push_back(char_text(h.symbol[0]) + " (" + h.name + ")");
    }
    if (!map.problems.empty()) return map;

    std::ifstream in(path, std::ios::binary);
    if (!in) {
        map.problems.push_back({0, "cannot open the map file; accepted: a readable text file"});
        return map;
    }
    std::string line;
    int line_number = 0;
    std::size_t bad = 0;
    int first_row_line = 0;
    while (std::getline(in, line)) {
        ++line_number;
        while (!line.empty() && (line.back() == '\r' || line.back() == ' ' || line.back() == '\t')) line.pop_back();
        if (line.empty() || line[0] == ';') continue;
        const int row = map.height++;
        if (row == 0) {
            map.width = static_cast<int>(line.size());
            first_row_line = line_number;
        } else if (static_cast<int>(line.size()) != map.width) {
            map.problems.push_back({line_number, "row " + std::to_string(row) + " has " + std::to_string(line.size()) +
                                                     " characters but the first row (line " +
                                                     std::to_string(first_row_line) + ") has " +
                                                     std::to_string(map.width) + "; accepted: rows of equal length"});
            continue;
        }
        for (std::size_t col = 0; col < line.size(); ++col) {
            auto it = class_of.find(line[col]);
            if (it != class_of.end()) {
                map.habitat_of_patch.push_back(it->second);
                continue;
            }
            map.habitat_of_patch.push_back(0);
            if (bad++ < max_reported)
                map.problems.push_back({line_number, "character " + char_text(line[col]) + " at column " +
                                                         std::to_string(col + 1) + " (patch X=" + std::to_string(col) +
                                                         ", Y=" + std::to_string(row) +
                                                         ") is no habitat's symbol; accepted: " + join_list(accepted)});
        }
        if (map.habitat_of_patch.size() > 100'000'000) {
            map.problems.push_back({line_number, "the map is too large; accepted: at most 1e8 patches"});
            return map;
        }
    }
    if (bad > max_reported)
        map.problems.push_back({0, std::to_string(bad - max_reported) + " more characters are no habitat's symbol"});
    if (map.height == 0)
        map.problems.push_back({0, "the map has no rows; accepted: one line of symbols per lattice row"});
    return map;
}

HabitatMap read_image_map(const std::string& path, const std::vector<Habitat>& habitats) {
    HabitatMap map;
    std::map<std::uint32_t, std::uint16_t> class_of;
    std::vector<std::string> accepted;
    for (std::size_t i = 0; i < habitats.size(); ++i) {
        const Habitat& h = habitats[i];
        auto rgb = parse_colour(h.colour);
        if (!rgb) continue;
        auto [it, fresh] = class_of.emplace(*rgb, static_cast<std::uint16_t>(i));
        if (!fresh)
            map.problems.push_back({0, "habitats " + toml_string(habitats[it->second].name) + " and " +
                                           toml_string(h.name) + " both have the colour " + colour_text(*rgb) +
                                           "; accepted: a distinct colour for every habitat (give each [[habitat]] "
                                           "its own colour)"});
        accepted.push_back(colour_text(*rgb) + " (" + h.name + ")");
    }
    if (!map.problems.empty()) return map;

    std::ifstream in(path, std::ios::binary);
    if (!in) {
        map.problems.push_back({0, "cannot open the map file; accepted: a readable PNG image"});
        return map;
    }
    const std::string bytes((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    // PNG only, and its size read from its header before anything is decoded: SFML's decoder
    // takes other formats too and allocates whatever a header claims (a 62-byte BMP claiming
    // 10^8 rows decoded for minutes; found by fuzz_image_map).
    const std::optional<std::string> not_png = png_header_problem(bytes);
    if (not_png) {
        map.problems.push_back({0, "cannot read the image (" + *not_png + "); accepted: a PNG image, one pixel per patch"});
        return map;
    }
    sf::Image image;
    // SFML explains a failure on its own error stream; catch it for our message.
    std::ostringstream why;
    std::streambuf* previous = sf::err().rdbuf(why.rdbuf());
    const bool loaded = !bytes.empty() && image.loadFromMemory(bytes.data(), bytes.size());
    sf::err().rdbuf(previous);
    if (!loaded) {
        std::string reason = why.str();
        while (!reason.empty() && (reason.back() == '\n' || reason.back() == ' ')) reason.pop_back();
        for (char& c : reason)
            if (c == '\n') c = ' ';
        map.problems.push_back({0, "cannot read the image" + (reason.empty() ? std::string() : " (" + reason + ")") +
                                       "; accepted: a PNG image, one pixel per patch"});
        return map;
    }
    const sf::Vector2u size = image.getSize();
    map.width = static_cast<int>(size.x);
    map.height = static_cast<int>(size.y);
    if (static_cast<double>(size.x) * size.y > 1e8) {
        map.problems.push_back({0, "the image has more than 1e8 pixels; accepted: at most 1e8 patches"});
        return map;
    }
    // Unknown colours are reported once each, at their first pixel, with how often they occur.
    struct Unknown {
        unsigned x, y;
        std::size_t count;
    };
    std::map<std::uint32_t, Unknown> unknown;
    std::vector<std::uint32_t> unknown_order;
    map.habitat_of_patch.reserve(static_cast<std::size_t>(size.x) * size.y);
    for (unsigned y = 0; y < size.y; ++y) {
        for (unsigned x = 0; x < size.x; ++x) {
            const sf::Color c = image.getPixel(x, y);
            const std::uint32_t rgb = (std::uint32_t{c.r} << 16) | (std::uint32_t{c.g} << 8) | c.b;
            auto it = class_of.find(rgb);
            if (it != class_of.end()) {
                map.habitat_of_patch.push_back(it->second);
                continue;
            }
            map.habitat_of_patch.push_back(0);
            auto [u, fresh] = unknown.emplace(rgb, Unknown{x, y, 0});
            if (fresh) unknown_order.push_back(rgb);
            ++u->second.count;
        }
    }
    for (std::size_t i = 0; i < unknown_order.size() && i < max_reported; ++i) {
        const Unknown& u = unknown[unknown_order[i]];
        std::string m = "pixel at column " + std::to_string(u.x) + ", row " + std::to_string(u.y) + " has colour " +
                        colour_text(unknown_order[i]) + ", which is no habitat's colour";
        if (u.count > 1) m += " (nor are the " + std::to_string(u.count - 1) + " other pixels of that colour)";
        map.problems.push_back({0, m + "; accepted: " + join_list(accepted)});
    }
    if (unknown_order.size() > max_reported)
        map.problems.push_back(
            {0, std::to_string(unknown_order.size() - max_reported) + " more colours are no habitat's colour"});
    return map;
}

}  // namespace tessera
