// Polynomials T(x) in the normalized ADC code: least squares and minimax (the second half of the
// correction module; see rtline/correction.hpp).
#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <numbers>
#include <string>

#include "rtline/correction.hpp"
#include "rtline/error.hpp"

namespace rtline {

std::string_view fit_name(FitKind k) { return k == FitKind::least_squares ? "least-squares" : "minimax"; }

FitKind parse_fit(std::string_view text, std::string_view field) {
    if (text == "least-squares") return FitKind::least_squares;
    if (text == "minimax") return FitKind::minimax;
    throw InputError(std::string(field), std::string(text), "unknown fit; choose least-squares or minimax");
}

double Polynomial::x(std::int64_t code) const {
    const double v = static_cast<double>(2 * code - (code_lo + code_hi)) / static_cast<double>(code_hi - code_lo);
    return std::clamp(v, -1.0, 1.0);
}

double Polynomial::evaluate(std::int64_t code) const {
    const double u = x(code);
    double sum = 0.0;
    for (auto c = coefficients_k.rbegin(); c != coefficients_k.rend(); ++c) sum = sum * u + *c;
    return sum;
}

namespace {

// The normalized code of the i-th code of the span.
double normalized(const CodeMap& map, std::size_t i) {
    const auto n1 = static_cast<double>(map.size() - 1);
    return (2.0 * static_cast<double>(i) - n1) / n1;
}

// Basis values φ_0(x) … φ_d(x) by the three-term recurrences.
void legendre(double x, int d, Eigen::VectorXd& p) {
    p(0) = 1.0;
    if (d >= 1) p(1) = x;
    for (int k = 1; k < d; ++k) p(k + 1) = ((2.0 * k + 1.0) * x * p(k) - k * p(k - 1)) / (k + 1.0);
}

void chebyshev(double x, int d, Eigen::VectorXd& t) {
    t(0) = 1.0;
    if (d >= 1) t(1) = x;
    for (int k = 1; k < d; ++k) t(k + 1) = 2.0 * x * t(k) - t(k - 1);
}

// Powers-of-x coefficients of Σ a_j φ_j, where φ_{k+1} = (α_k·x·φ_k − β_k·φ_{k−1}) / γ_k.
template <typename Step>
std::vector<double> to_powers(const Eigen::VectorXd& a, Step step) {
    const int d = static_cast<int>(a.size()) - 1;
    std::vector<std::vector<double>> phi(static_cast<std::size_t>(d) + 1,
                                         std::vector<double>(static_cast<std::size_t>(d) + 1, 0.0));
    phi[0][0] = 1.0;
    if (d >= 1) phi[1][1] = 1.0;
    for (int k = 1; k < d; ++k) {
        const auto [alpha, beta, gamma] = step(k);
        auto& next = phi[static_cast<std::size_t>(k) + 1];
        const auto& cur = phi[static_cast<std::size_t>(k)];
        const auto& prev = phi[static_cast<std::size_t>(k) - 1];
        for (int i = 0; i <= d; ++i) {
            const double shifted = i > 0 ? cur[static_cast<std::size_t>(i) - 1] : 0.0;
            next[static_cast<std::size_t>(i)] = (alpha * shifted - beta * prev[static_cast<std::size_t>(i)]) / gamma;
        }
    }
    std::vector<double> c(static_cast<std::size_t>(d) + 1, 0.0);
    for (int j = 0; j <= d; ++j) {
        for (int i = 0; i <= d; ++i)
            c[static_cast<std::size_t>(i)] += a(j) * phi[static_cast<std::size_t>(j)][static_cast<std::size_t>(i)];
    }
    return c;
}

struct Triple {
    double alpha, beta, gamma;
};

std::vector<double> least_squares(const CodeMap& map, int d) {
    Eigen::MatrixXd g = Eigen::MatrixXd::Zero(d + 1, d + 1);
    Eigen::VectorXd b = Eigen::VectorXd::Zero(d + 1);
    Eigen::VectorXd p(d + 1);
    for (std::size_t i = 0; i < map.size(); ++i) {
        legendre(normalized(map, i), d, p);
        g.selfadjointView<Eigen::Lower>().rankUpdate(p);
        b += map.t_k[i] * p;
    }
    const Eigen::VectorXd a = g.selfadjointView<Eigen::Lower>().ldlt().solve(b);
    return to_powers(a, [](int k) { return Triple{2.0 * k + 1.0, static_cast<double>(k), k + 1.0}; });
}

// The reference's error extremes: one per run of equal sign (its largest |error|), which alternate.
std::vector<std::size_t> alternating_extremes(const std::vector<double>& err) {
    std::vector<std::size_t> ext;
    int sign = 0;
    for (std::size_t i = 0; i < err.size(); ++i) {
        const int s = err[i] > 0.0 ? 1 : (err[i] < 0.0 ? -1 : 0);
        if (s == 0) continue;
        if (s != sign) {
            ext.push_back(i);
            sign = s;
        } else if (std::abs(err[i]) > std::abs(err[ext.back()])) {
            ext.back() = i;
        }
    }
    return ext;
}

// Trims an alternating list to `want` points, keeping alternation: drop the smallest end point, or
// the smallest interior point together with its smaller neighbour (whose signs then agree).
void trim(std::vector<std::size_t>& ext, const std::vector<double>& err, std::size_t want) {
    auto mag = [&err](std::size_t i) { return std::abs(err[i]); };
    while (ext.size() > want) {
        if (ext.size() == want + 1) {
            ext.erase(mag(ext.front()) < mag(ext.back()) ? ext.begin() : ext.end() - 1);
            continue;
        }
        const auto smallest =
            std::min_element(ext.begin(), ext.end(), [&](std::size_t a, std::size_t b) { return mag(a) < mag(b); });
        if (smallest == ext.begin() || smallest == ext.end() - 1) {
            ext.erase(smallest);
            continue;
        }
        const auto neighbour = mag(*(smallest - 1)) < mag(*(smallest + 1)) ? smallest - 1 : smallest + 1;
        const auto first = std::min(smallest, neighbour);
        ext.erase(first, first + 2);
    }
}

// The Remez exchange on the span's codes (a discrete point set): solve Σ a_i T_i(x_j) + (−1)^j E = f_j
// on a reference of d + 2 codes, move the reference to the alternating extremes of the error, repeat
// until the largest error and the reference's smallest agree (Chebyshev's alternation theorem says the
// minimax polynomial's error equioscillates on d + 2 points).
std::vector<double> minimax(const CodeMap& map, int d) {
    const std::size_t n = map.size();
    const auto want = static_cast<std::size_t>(d) + 2;
    std::vector<std::size_t> ref(want);
    for (std::size_t j = 0; j < want; ++j) {
        const double c =
            0.5 * (1.0 - std::cos(std::numbers::pi * static_cast<double>(j) / static_cast<double>(want - 1)));
        ref[j] = static_cast<std::size_t>(std::llround(c * static_cast<double>(n - 1)));
        if (j > 0) ref[j] = std::max(ref[j], ref[j - 1] + 1);
    }
    for (std::size_t j = want; j-- > 0;) ref[j] = std::min(ref[j], n - want + j);

    Eigen::VectorXd t(d + 1);
    Eigen::VectorXd best_a;
    double best_max = INFINITY;
    std::vector<double> err(n);
    for (int iter = 0; iter < 60; ++iter) {
        Eigen::MatrixXd a_mat(want, want);
        Eigen::VectorXd f(want);
        for (std::size_t j = 0; j < want; ++j) {
            chebyshev(normalized(map, ref[j]), d, t);
            a_mat.row(static_cast<Eigen::Index>(j)).head(d + 1) = t.transpose();
            a_mat(static_cast<Eigen::Index>(j), d + 1) = j % 2 == 0 ? 1.0 : -1.0;
            f(static_cast<Eigen::Index>(j)) = map.t_k[ref[j]];
        }
        const Eigen::VectorXd sol = a_mat.colPivHouseholderQr().solve(f);
        const Eigen::VectorXd a = sol.head(d + 1);
        double largest = 0.0;
        for (std::size_t i = 0; i < n; ++i) {
            chebyshev(normalized(map, i), d, t);
            err[i] = t.dot(a) - map.t_k[i];
            largest = std::max(largest, std::abs(err[i]));
        }
        if (largest < best_max) {
            best_max = largest;
            best_a = a;
        }
        std::vector<std::size_t> ext = alternating_extremes(err);
        if (ext.size() < want) break;  // the error no longer alternates enough: nothing left to exchange
        trim(ext, err, want);
        double smallest = INFINITY;
        for (const std::size_t i : ext) smallest = std::min(smallest, std::abs(err[i]));
        if (ext == ref || largest - smallest <= 1e-9 * largest) break;
        ref = std::move(ext);
    }
    return to_powers(best_a, [](int) { return Triple{2.0, 1.0, 1.0}; });
}

}  // namespace

Polynomial fit_polynomial(const CodeMap& map, int degree, FitKind fit) {
    if (degree < 1 || degree > kMaxDegree) {
        throw InputError(Input::degree, std::to_string(degree), "choose a degree from 1 to " + std::to_string(kMaxDegree));
    }
    if (map.size() < static_cast<std::size_t>(degree) + 2) {
        throw InputError(Input::degree, std::to_string(degree),
                         "the span covers only " + std::to_string(map.size()) + " codes, too few for this degree");
    }
    Polynomial p;
    p.fit = fit;
    p.degree = degree;
    p.code_lo = map.code_lo;
    p.code_hi = map.code_hi;
    p.coefficients_k = fit == FitKind::least_squares ? least_squares(map, degree) : minimax(map, degree);
    p.error_k.resize(map.size());
    for (std::size_t i = 0; i < map.size(); ++i) {
        const std::int64_t code = map.code_lo + static_cast<std::int64_t>(i);
        p.error_k[i] = p.evaluate(code) - map.t_k[i];
        if (std::abs(p.error_k[i]) > p.max_error_k) {
            p.max_error_k = std::abs(p.error_k[i]);
            p.at_code = code;
        }
    }
    if (p.max_error_k == 0.0) p.at_code = map.code_lo;
    return p;
}

Polynomial lowest_degree(const CodeMap& map, double max_error_k, FitKind fit) {
    const int top = static_cast<int>(std::min<std::size_t>(kMaxDegree, map.size() - 2));
    for (int d = 1; d <= top; ++d) {
        Polynomial p = fit_polynomial(map, d, fit);
        if (p.max_error_k <= max_error_k) return p;
        if (d == top) {
            throw InfeasibleError("no polynomial of degree up to " + std::to_string(top) + " meets " +
                                  format_number(max_error_k, 4) +
                                  " \xC2\xB0"
                                  "C (degree " +
                                  std::to_string(top) + " gives " + format_number(p.max_error_k, 4) +
                                  " \xC2\xB0"
                                  "C); use a table");
        }
    }
    throw InfeasibleError("the span has too few codes for a polynomial");
}

}  // namespace rtline
