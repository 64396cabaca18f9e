#include "rtline/fit.hpp"

#include <Eigen/Dense>
#include <cmath>

#include "rtline/error.hpp"
#include "rtline/units.hpp"

namespace rtline {

namespace {

// "1 point", "3 points": the count of points for an error message.
std::string count_points(std::size_t n) { return std::to_string(n) + (n == 1 ? " point" : " points"); }

double max_abs(const std::vector<Residual>& rs) {
    double m = 0.0;
    for (const Residual& r : rs) m = std::max(m, std::abs(r.residual_k));
    return m;
}

// The residuals of a fitted model, refused when the model cannot give back the temperature of a point:
// its temperature there is not a finite positive number (1/T cancels to zero or below, as it did for a
// point typed at 5.6e58 °C among ordinary ones), or, for a fit that passes through its points exactly,
// it misses one by more than 1e-6·T (a well-posed three-point fit misses by about 1e-12·T; more means
// the points are too far apart for double precision). Nothing such a model would print could be trusted.
std::vector<Residual> usable_residuals(const Thermistor& model, const std::vector<RtPoint>& points, const char* what,
                                       bool exact) {
    std::vector<Residual> rs;
    rs.reserve(points.size());
    for (const RtPoint& p : points) {
        const double t_model = model.temperature(p.r_ohm);
        const double residual_k = t_model - p.t_k;
        const bool missed = exact && !(std::abs(residual_k) <= 1e-6 * p.t_k);
        if (!std::isfinite(t_model) || !(t_model > 0.0) || missed) {
            throw InputError(Input::points, count_points(points.size()),
                             std::string("the ") + what + " fit cannot give back the temperature of the point at " +
                                 format_number(kelvin_to_celsius(p.t_k)) +
                                 " \xC2\xB0"
                                 "C (" +
                                 format_resistance(p.r_ohm) + " ohm); check the points' temperatures");
        }
        rs.push_back({p.t_k, p.r_ohm, residual_k});
    }
    return rs;
}

// Weighted least squares with the columns scaled to unit norm, solved by column-pivoting QR.
// Throws InputError when the design matrix is rank-deficient (collinear or repeated points).
Eigen::VectorXd solve_scaled(Eigen::MatrixXd a, const Eigen::VectorXd& y, const char* what) {
    Eigen::VectorXd scale(a.cols());
    for (Eigen::Index j = 0; j < a.cols(); ++j) {
        scale(j) = a.col(j).norm();
        if (scale(j) == 0.0) scale(j) = 1.0;
        a.col(j) /= scale(j);
    }
    Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(a);
    qr.setThreshold(1e-12);
    if (qr.rank() < a.cols()) {
        throw InputError(Input::points, count_points(static_cast<std::size_t>(a.rows())),
                         std::string("the points do not determine a ") + what +
                             " fit (too few distinct resistances, or collinear in ln R)");
    }
    Eigen::VectorXd x = qr.solve(y);
    for (Eigen::Index j = 0; j < a.cols(); ++j) x(j) /= scale(j);
    return x;
}

}  // namespace

SteinhartHart steinhart_hart_three_point(const RtPoint& p1, const RtPoint& p2, const RtPoint& p3) {
    const double l1 = std::log(p1.r_ohm);
    const double l2 = std::log(p2.r_ohm);
    const double l3 = std::log(p3.r_ohm);
    const double y1 = 1.0 / p1.t_k;
    const double y2 = 1.0 / p2.t_k;
    const double y3 = 1.0 / p3.t_k;
    const double g2 = (y2 - y1) / (l2 - l1);
    const double g3 = (y3 - y1) / (l3 - l1);
    const double c = (g3 - g2) / ((l3 - l2) * (l1 + l2 + l3));
    const double b = g2 - c * (l1 * l1 + l1 * l2 + l2 * l2);
    const double a = y1 - (b + c * l1 * l1) * l1;
    return {a, b, c};
}

ShFit fit_steinhart_hart(const std::vector<RtPoint>& points) {
    if (points.size() < 3) {
        throw InputError(Input::points, count_points(points.size()), "a Steinhart-Hart fit needs at least 3 R-T points");
    }
    SteinhartHart m;
    const auto n = static_cast<Eigen::Index>(points.size());
    // ln R is scaled by its largest magnitude so that L and L³ are of order one.
    double l_scale = 0.0;
    for (const RtPoint& p : points) l_scale = std::max(l_scale, std::abs(std::log(p.r_ohm)));
    if (l_scale == 0.0) l_scale = 1.0;
    Eigen::MatrixXd a(n, 3);
    Eigen::VectorXd y(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const RtPoint& p = points[static_cast<std::size_t>(i)];
        const double w = p.t_k * p.t_k;  // δ(1/T) ≈ −δT/T²
        const double s = std::log(p.r_ohm) / l_scale;
        a(i, 0) = w;
        a(i, 1) = w * s;
        a(i, 2) = w * s * s * s;
        y(i) = w / p.t_k;
    }
    const Eigen::VectorXd x = solve_scaled(a, y, "Steinhart-Hart");
    m.a = x(0);
    m.b = x(1) / l_scale;
    m.c = x(2) / (l_scale * l_scale * l_scale);
    if (points.size() == 3) {
        // Three points: the closed form is exact; use it (the QR solution agrees to rounding).
        m = steinhart_hart_three_point(points[0], points[1], points[2]);
    }
    const Thermistor model(m);
    const Span span{points.front().t_k, points.back().t_k};
    try {
        // Coefficients that turn back between the points describe no thermistor: every command would
        // refuse them over this span, so refuse them here, where the points can still be fixed.
        model.check_span(span, Input::points);
    } catch (const InputError&) {
        throw InputError(Input::points, count_points(points.size()),
                         "the Steinhart-Hart fit does not give a resistance that falls monotonically from " +
                             format_number(kelvin_to_celsius(span.lo_k)) + " to " +
                             format_number(kelvin_to_celsius(span.hi_k)) +
                             " \xC2\xB0"
                             "C; check the points, or use the beta model");
    }
    ShFit fit{m, usable_residuals(model, points, "Steinhart-Hart", points.size() == 3), 0.0};
    fit.max_residual_k = max_abs(fit.residuals);
    return fit;
}

BetaFit fit_beta(const std::vector<RtPoint>& points, double t0_k) {
    if (points.size() < 2) {
        throw InputError(Input::points, count_points(points.size()), "a beta fit needs at least 2 R-T points");
    }
    const auto n = static_cast<Eigen::Index>(points.size());
    // 1/T = a + b·(ln R − ln R_ref); the shift by a central ln R keeps the two columns apart.
    double l_ref = 0.0;
    for (const RtPoint& p : points) l_ref += std::log(p.r_ohm);
    l_ref /= static_cast<double>(n);
    Eigen::MatrixXd a(n, 2);
    Eigen::VectorXd y(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const RtPoint& p = points[static_cast<std::size_t>(i)];
        const double w = p.t_k * p.t_k;
        a(i, 0) = w;
        a(i, 1) = w * (std::log(p.r_ohm) - l_ref);
        y(i) = w / p.t_k;
    }
    const Eigen::VectorXd x = solve_scaled(a, y, "beta");
    const double b_k = 1.0 / x(1);
    // 1/t0 = x0 + (ln R0 − l_ref)/B  ⇒  ln R0 = l_ref + B·(1/t0 − x0).
    const double r0 = std::exp(l_ref + b_k * (1.0 / t0_k - x(0)));
    if (!(b_k > 0.0) || !std::isfinite(b_k)) {
        throw InputError(Input::points, count_points(static_cast<std::size_t>(n)),
                         "the beta fit gives no positive B-value");
    }
    if (!std::isnormal(r0)) {
        throw InputError(Input::points, count_points(static_cast<std::size_t>(n)),
                         "the beta fit's R0 at " + format_number(kelvin_to_celsius(t0_k)) +
                             " \xC2\xB0"
                             "C is beyond the range of a double; state R0 at a temperature among the points ({t0})");
    }
    BetaModel m{r0, t0_k, b_k};
    BetaFit fit{m, usable_residuals(Thermistor(m), points, "beta", points.size() == 2), 0.0};
    fit.max_residual_k = max_abs(fit.residuals);
    return fit;
}

}  // namespace rtline
