#include "theory/limit_fitness.hpp"

#include <Eigen/Eigenvalues>

#include <algorithm>
#include <functional>
#include <limits>
#include <set>
#include <utility>

namespace tessera {

Eigen::MatrixXd non_resident_jacobian(const DeterministicOde& ode, const std::vector<double>& equilibrium,
                                      const std::vector<char>& resident, double step) {
    const std::size_t n = equilibrium.size();
    Eigen::MatrixXd J = Eigen::MatrixXd::Zero(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
    std::vector<double> base(n), f1(n), f2(n), y = equilibrium;
    ode(y, base, 0.0);
    for (std::size_t k = 0; k < n; ++k) {
        if (resident[k]) continue;
        // Non-residents sit at 0, so only a step upwards stays in the model's domain.
        y[k] = equilibrium[k] + step;
        ode(y, f1, 0.0);
        y[k] = equilibrium[k] + 0.5 * step;
        ode(y, f2, 0.0);
        y[k] = equilibrium[k];
        for (std::size_t c = 0; c < n; ++c) {
            if (resident[c]) continue;
            const double d1 = (f1[c] - base[c]) / step;
            const double d2 = (f2[c] - base[c]) / (0.5 * step);
            J(static_cast<Eigen::Index>(c), static_cast<Eigen::Index>(k)) = 2.0 * d2 - d1;
        }
    }
    return J;
}

double leading_eigenvalue(const Eigen::MatrixXd& block) {
    if (block.rows() == 1) return block(0, 0);
    Eigen::EigenSolver<Eigen::MatrixXd> solver(block, false);
    double best = -std::numeric_limits<double>::infinity();
    for (Eigen::Index i = 0; i < solver.eigenvalues().size(); ++i) best = std::max(best, solver.eigenvalues()[i].real());
    return best;
}

FitnessClasses fitness_classes(const Eigen::MatrixXd& J, const std::vector<char>& resident, double threshold) {
    const int n = static_cast<int>(resident.size());
    std::vector<std::vector<int>> out(static_cast<std::size_t>(n));  // k -> c when J(c, k) couples
    for (int k = 0; k < n; ++k) {
        if (resident[static_cast<std::size_t>(k)]) continue;
        for (int c = 0; c < n; ++c) {
            if (c != k && !resident[static_cast<std::size_t>(c)] && J(c, k) > threshold)
                out[static_cast<std::size_t>(k)].push_back(c);
        }
    }
    // Tarjan's strongly connected components (Tarjan 1972, SIAM J. Comput. 1:146-160).
    std::vector<int> index(static_cast<std::size_t>(n), -1), low(static_cast<std::size_t>(n), 0), component(static_cast<std::size_t>(n), -1);
    std::vector<char> on_stack(static_cast<std::size_t>(n), 0);
    std::vector<int> stack;
    std::vector<std::vector<int>> found;
    int counter = 0;
    std::function<void(int)> visit = [&](int v) {
        const auto uv = static_cast<std::size_t>(v);
        index[uv] = low[uv] = counter++;
        stack.push_back(v);
        on_stack[uv] = 1;
        for (int w : out[uv]) {
            const auto uw = static_cast<std::size_t>(w);
            if (index[uw] < 0) {
                visit(w);
                low[uv] = std::min(low[uv], low[uw]);
            } else if (on_stack[uw]) {
                low[uv] = std::min(low[uv], index[uw]);
            }
        }
        if (low[uv] == index[uv]) {
            std::vector<int> members;
            int w;
            do {
                w = stack.back();
                stack.pop_back();
                on_stack[static_cast<std::size_t>(w)] = 0;
                members.push_back(w);
            } while (w != v);
            std::sort(members.begin(), members.end());
            found.push_back(std::move(members));
        }
    };
    for (int v = 0; v < n; ++v) {
        if (!resident[static_cast<std::size_t>(v)] && index[static_cast<std::size_t>(v)] < 0) visit(v);
    }
    std::sort(found.begin(), found.end(), [](const auto& a, const auto& b) { return a.front() < b.front(); });

    FitnessClasses fc;
    fc.class_of.assign(static_cast<std::size_t>(n), -1);
    for (std::size_t u = 0; u < found.size(); ++u) {
        for (int c : found[u]) fc.class_of[static_cast<std::size_t>(c)] = static_cast<int>(u);
    }
    for (const auto& m : found) {
        const auto size = static_cast<Eigen::Index>(m.size());
        Eigen::MatrixXd block(size, size);
        for (Eigen::Index i = 0; i < size; ++i)
            for (Eigen::Index j = 0; j < size; ++j) block(i, j) = J(m[static_cast<std::size_t>(i)], m[static_cast<std::size_t>(j)]);
        fc.growth.push_back(leading_eigenvalue(block));
    }
    fc.members = std::move(found);
    std::set<std::pair<int, int>> edges;
    for (int k = 0; k < n; ++k) {
        for (int c : out[static_cast<std::size_t>(k)]) {
            const int a = fc.class_of[static_cast<std::size_t>(k)], b = fc.class_of[static_cast<std::size_t>(c)];
            if (a != b) edges.insert({a, b});
        }
    }
    for (const auto& [a, b] : edges) fc.edges.push_back({a, b});
    return fc;
}

}  // namespace tessera
