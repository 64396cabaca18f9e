// Golden-section search (internal to the core): the one routine the continuous sizing and the budget's
// worst case both refine a bracketed extreme with.
#pragma once

namespace rtline::detail {

inline constexpr double kGoldenFraction = 0.38196601125010515;  // 2 − φ

// A minimum of f on [a, b] by golden-section search (Kiefer, "Sequential minimax search for a maximum",
// Proc. AMS 4, 1953): the bracket shrinks by 1 − kGoldenFraction per evaluation until it is no longer
// than `tol`. Returns the better of the last two points and sets fbest to its value. For a maximum,
// minimize −f.
template <class F>
double golden_section_min(F&& f, double a, double b, double tol, double& fbest) {
    double x1 = a + kGoldenFraction * (b - a);
    double x2 = b - kGoldenFraction * (b - a);
    double f1 = f(x1);
    double f2 = f(x2);
    while (b - a > tol) {
        if (f1 <= f2) {
            b = x2;
            x2 = x1;
            f2 = f1;
            x1 = a + kGoldenFraction * (b - a);
            f1 = f(x1);
        } else {
            a = x1;
            x1 = x2;
            f1 = f2;
            x2 = b - kGoldenFraction * (b - a);
            f2 = f(x2);
        }
    }
    if (f1 <= f2) {
        fbest = f1;
        return x1;
    }
    fbest = f2;
    return x2;
}

}  // namespace rtline::detail
