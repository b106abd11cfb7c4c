#include "study/parameter_grid.hpp"

#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <limits>

namespace tessera {

namespace {

std::string trim(const std::string& s) {
    std::size_t a = 0, b = s.size();
    while (a < b && (s[a] == ' ' || s[a] == '\t')) ++a;
    while (b > a && (s[b - 1] == ' ' || s[b - 1] == '\t')) --b;
    return s.substr(a, b - a);
}

std::vector<std::string> split(const std::string& s, char sep) {
    std::vector<std::string> out;
    std::size_t start = 0;
    for (;;) {
        const std::size_t at = s.find(sep, start);
        out.push_back(s.substr(start, at == std::string::npos ? std::string::npos : at - start));
        if (at == std::string::npos) return out;
        start = at + 1;
    }
}

// Splits a list at commas outside [...], {...} and "..." (TOML arrays and strings stay whole).
std::vector<std::string> split_list(const std::string& s) {
    std::vector<std::string> out;
    std::string item;
    int depth = 0;
    bool quoted = false;
    for (char c : s) {
        if (c == '"') quoted = !quoted;
        if (!quoted && (c == '[' || c == '{')) ++depth;
        if (!quoted && (c == ']' || c == '}')) --depth;
        if (c == ',' && depth == 0 && !quoted) {
            out.push_back(trim(item));
            item.clear();
        } else {
            item += c;
        }
    }
    out.push_back(trim(item));
    return out;
}

bool parse_number(const std::string& text, double& value) {
    const std::string t = trim(text);
    if (t.empty()) return false;
    errno = 0;
    char* end = nullptr;
    value = std::strtod(t.c_str(), &end);
    return errno == 0 && end == t.c_str() + t.size() && std::isfinite(value);
}

std::string number_text(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.*g", grid_value_digits, v);
    return buf;
}

}  // namespace

GridAxis parse_vary(const std::string& spec) {
    const std::size_t eq = spec.find('=');
    if (eq == std::string::npos)
        throw VaryError("", "--vary " + spec + ": expected KEY=FROM:TO:N, KEY=log:FROM:TO:N or KEY=v1,v2,...");
    GridAxis axis;
    axis.key = trim(spec.substr(0, eq));
    const std::string body = trim(spec.substr(eq + 1));
    const std::string where = "--vary " + axis.key + ": ";
    if (axis.key.empty()) throw VaryError("", "--vary " + spec + ": the key before '=' is empty");
    if (body.empty())
        throw VaryError(axis.key, where + "no values after '='; expected FROM:TO:N, log:FROM:TO:N or v1,v2,...");

    std::vector<std::string> parts = split(body, ':');
    const bool log_scale = parts.size() == 4 && trim(parts[0]) == "log";
    if (log_scale) parts.erase(parts.begin());
    const bool range = parts.size() == 3 && body.find(',') == std::string::npos;
    if (!range) {
        if (log_scale || body.find(':') != std::string::npos) {
            if (body.find(',') == std::string::npos)
                throw VaryError(axis.key, where + "'" + body + "' is not a range; expected FROM:TO:N or log:FROM:TO:N");
        }
        for (const std::string& item : split_list(body)) {
            if (item.empty()) throw VaryError(axis.key, where + "an empty value in the list '" + body + "'");
            axis.values.push_back(item);
        }
        return axis;
    }

    double from = 0, to = 0, n_real = 0;
    if (!parse_number(parts[0], from))
        throw VaryError(axis.key, where + "FROM '" + trim(parts[0]) + "' is not a number (in '" + body + "')");
    if (!parse_number(parts[1], to))
        throw VaryError(axis.key, where + "TO '" + trim(parts[1]) + "' is not a number (in '" + body + "')");
    if (!parse_number(parts[2], n_real) || n_real != std::floor(n_real) || n_real < 1 || n_real > 1e6)
        throw VaryError(axis.key, where + "N '" + trim(parts[2]) + "' must be a whole number from 1 to 1000000 (in '" +
                                      body + "')");
    const auto n = static_cast<std::size_t>(n_real);
    if (n > 1 && from == to)
        throw VaryError(axis.key, where + "empty range: FROM and TO are both " + trim(parts[0]) + " (in '" + body +
                                      "'); give two different ends, or N = 1 for a single value");
    if (n == 1 && from != to)
        throw VaryError(axis.key, where + "N = 1 gives one value, but FROM and TO differ (in '" + body +
                                      "'); use FROM:FROM:1 or a list");
    if (log_scale && (from <= 0 || to <= 0))
        throw VaryError(axis.key, where + "a log range needs FROM and TO > 0 (in '" + body + "')");
    for (std::size_t k = 0; k < n; ++k) {
        double v;
        if (k == 0) {
            v = from;
        } else if (k + 1 == n) {
            v = to;  // the end exactly, not a sum of steps
        } else {
            const double f = static_cast<double>(k) / static_cast<double>(n - 1);
            v = log_scale ? std::exp(std::log(from) + f * (std::log(to) - std::log(from))) : from + f * (to - from);
        }
        axis.values.push_back(number_text(v));
    }
    return axis;
}

ParameterGrid::ParameterGrid(std::vector<GridAxis> axes) : axes_(std::move(axes)) {
    size_ = axes_.empty() ? 0 : 1;
    for (std::size_t a = 0; a < axes_.size(); ++a) {
        for (std::size_t b = 0; b < a; ++b) {
            if (axes_[a].key == axes_[b].key)
                throw VaryError(axes_[a].key, "--vary " + axes_[a].key + ": the key is varied twice; give it once");
        }
        size_ *= axes_[a].values.size();
    }
}

std::vector<std::size_t> ParameterGrid::coordinates(std::size_t point) const {
    std::vector<std::size_t> c(axes_.size());
    for (std::size_t a = axes_.size(); a-- > 0;) {
        c[a] = point % axes_[a].values.size();
        point /= axes_[a].values.size();
    }
    return c;
}

std::vector<std::string> ParameterGrid::values(std::size_t point) const {
    const std::vector<std::size_t> c = coordinates(point);
    std::vector<std::string> out;
    for (std::size_t a = 0; a < axes_.size(); ++a) out.push_back(axes_[a].values[c[a]]);
    return out;
}

std::vector<std::string> ParameterGrid::overrides(std::size_t point) const {
    const std::vector<std::string> v = values(point);
    std::vector<std::string> out;
    for (std::size_t a = 0; a < axes_.size(); ++a) out.push_back(axes_[a].key + "=" + v[a]);
    return out;
}

}  // namespace tessera
