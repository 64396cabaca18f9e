#include "svg.hpp"

#include <algorithm>
#include <cstdio>
#include <limits>
#include <stdexcept>

namespace rtline::cli::svg {

namespace {

// An estimate of the rendered width from DejaVu Sans's advance widths (other sans-serif fonts are
// close): space 0.32 em, digits 0.64, capitals about 0.70, small letters about 0.56 on average,
// punctuation about 0.40, anything else (°, −, µ) 0.70. Bold text is about 8 % wider.
double text_width(std::string_view s, double font_px, bool bold = false) {
    double em = 0.0;
    auto advance = [](unsigned char c) {
        if (c == ' ') return 0.32;
        if (c >= '0' && c <= '9') return 0.64;
        if (c >= 'a' && c <= 'z') return 0.56;
        const bool capital = c >= 'A' && c <= 'Z';
        return c < 0x80 && !capital ? 0.40 : 0.70;
    };
    for (const unsigned char c : s) {
        if ((c & 0xC0) != 0x80) em += advance(c);  // a continuation byte counts with its lead byte
    }
    return em * font_px * (bold ? 1.08 : 1.0);
}

std::string px(double v) {
    char b[32];
    std::snprintf(b, sizeof b, "%.2f", v);
    std::string s = b;
    if (s == "-0.00") s = "0.00";
    return s;
}

// Words of `text` in lines no wider than `width_px` at `font_px`.
std::vector<std::string> wrap(const std::string& text, double font_px, double width_px, bool bold = false) {
    std::vector<std::string> lines;
    std::string line;
    std::size_t start = 0;
    while (start <= text.size()) {
        std::size_t end = text.find(' ', start);
        if (end == std::string::npos) end = text.size();
        const std::string word = text.substr(start, end - start);
        std::string candidate = line;
        if (!candidate.empty()) candidate += ' ';
        candidate += word;
        if (!line.empty() && text_width(candidate, font_px, bold) > width_px) {
            lines.push_back(line);
            line = word;
        } else {
            line = candidate;
        }
        start = end + 1;
    }
    if (!line.empty()) lines.push_back(line);
    return lines;
}

}  // namespace

// ----------------------------------------------------------------------------------- layout

namespace {

constexpr double kTickFont = 13.0;
constexpr double kLabelFont = 14.0;
constexpr double kPanelTitleFont = 15.0;
constexpr double kTitleFont = 18.0;
constexpr double kNoteFont = 13.0;
constexpr double kLegendFont = 13.0;
constexpr double kLegendRow = 20.0;
constexpr double kLegendSample = 30.0;
constexpr const char* kInk = "#222222";
constexpr const char* kGrid = "#e3e3e3";
constexpr const char* kFrame = "#555555";

// An axis as drawn: its range, the tick values and their labels, and a pixel mapping.
struct AxisPlan {
    Scale scale = Scale::linear;
    double lo = 0.0;
    double hi = 1.0;
    std::vector<double> ticks;
    std::vector<std::string> labels;
    std::vector<double> minor;  // unlabelled grid lines (log axes)
    double p_lo = 0.0;          // pixel of lo
    double p_hi = 1.0;          // pixel of hi
    [[nodiscard]] double u(double v) const { return scale == Scale::log10 ? std::log10(v) : v; }
    [[nodiscard]] double at(double v) const { return p_lo + (u(v) - u(lo)) / (u(hi) - u(lo)) * (p_hi - p_lo); }
};

// The data range of one direction of a plot: every finite value (positive ones on a log axis).
std::pair<double, double> data_range(const Plot& p, bool x_dir, Scale scale) {
    double lo = std::numeric_limits<double>::infinity();
    double hi = -lo;
    auto take = [&](const std::vector<double>& xs, const std::vector<double>& ys) {
        for (std::size_t i = 0; i < xs.size() && i < ys.size(); ++i) {
            const double v = x_dir ? xs[i] : ys[i];
            if (!std::isfinite(xs[i]) || !std::isfinite(ys[i])) continue;
            if (scale == Scale::log10 && !(v > 0.0)) continue;
            lo = std::min(lo, v);
            hi = std::max(hi, v);
        }
    };
    for (const Series& s : p.lines) take(s.x, s.y);
    for (const Markers& m : p.markers) take(m.x, m.y);
    if (!(lo <= hi)) throw std::logic_error("a plot has no finite data to draw");
    return {lo, hi};
}

// The range, ticks and labels of an axis `length_px` long; x axes sit along the bottom.
AxisPlan plan_axis(const Plot& p, const Axis& a, bool x_dir, double length_px) {
    AxisPlan plan;
    plan.scale = a.scale;
    auto [lo, hi] = data_range(p, x_dir, a.scale);
    const bool log = a.scale == Scale::log10;
    if (log) {
        if (hi / lo < 1.0 + 1e-9) {
            lo /= 1.5;
            hi *= 1.5;
        } else if (!x_dir) {
            const double pad = std::pow(hi / lo, 0.05);
            lo /= pad;
            hi *= pad;
        }
    } else {
        if (hi - lo <= 1e-12 * std::max(std::abs(lo), std::abs(hi))) {
            const double d = lo == 0.0 ? 1.0 : 0.1 * std::abs(lo);
            lo -= d;
            hi += d;
        } else if (!x_dir) {
            const double pad = 0.05 * (hi - lo);
            lo -= pad;
            hi += pad;
        }
    }
    if (std::isfinite(a.lo)) lo = a.lo;
    if (std::isfinite(a.hi)) hi = a.hi;
    if (!(lo < hi) || (log && !(lo > 0.0)))
        throw std::logic_error("an axis range is empty or not positive on a log axis");
    plan.lo = lo;
    plan.hi = hi;
    plan.p_lo = 0.0;
    plan.p_hi = length_px;

    // The most ticks whose labels stay apart: along x a label's width plus a gap, along y its height.
    auto fits = [&](const std::vector<double>& ticks, const std::vector<std::string>& labels) {
        for (std::size_t i = 1; i < ticks.size(); ++i) {
            const double gap = std::abs(plan.at(ticks[i]) - plan.at(ticks[i - 1]));
            const double need =
                x_dir ? 0.5 * (text_width(labels[i], kTickFont) + text_width(labels[i - 1], kTickFont)) + 14.0
                      : kTickFont + 8.0;
            if (gap < need) return false;
        }
        return true;
    };
    auto label_all = [&](const std::vector<double>& ticks, double step) {
        std::vector<std::string> labels;
        labels.reserve(ticks.size());
        for (const double t : ticks) labels.push_back(tick_label(t, log ? t : step, a.ticks));
        return labels;
    };
    if (log) {
        // The densest ladder of mantissas whose labels fit; linear nice ticks when none leaves two.
        static const std::vector<std::vector<int>> ladder = {
            {1, 2, 3, 4, 5, 6, 7, 8, 9}, {1, 2, 3, 5}, {1, 2, 5}, {1, 3}, {1}};
        std::vector<double> ticks;
        std::vector<std::string> labels;
        for (const std::vector<int>& m : ladder) {
            std::vector<double> t = log_ticks(lo, hi, m);
            if (t.empty()) continue;
            ticks = t;
            labels = label_all(ticks, 0.0);
            if (fits(ticks, labels)) break;
        }
        if (ticks.empty()) {
            const int target = 4;
            const double step = nice_step(lo, hi, target);
            ticks = nice_ticks(lo, hi, target);
            for (const double t : ticks) labels.push_back(tick_label(t, step, a.ticks));
        }
        while (!fits(ticks, labels) && ticks.size() > 2) {  // every other decade until they fit
            std::vector<double> kept;
            for (std::size_t i = 0; i < ticks.size(); i += 2) kept.push_back(ticks[i]);
            ticks = kept;
            labels = label_all(ticks, 0.0);
        }
        plan.ticks = ticks;
        plan.labels = labels;
        if (std::log10(hi / lo) <= 4.0) {
            for (int e = static_cast<int>(std::floor(std::log10(lo))); e <= static_cast<int>(std::ceil(std::log10(hi)));
                 ++e) {
                for (int m = 1; m <= 9; ++m) {
                    const double v = m * std::pow(10.0, e);
                    if (v > lo && v < hi && std::find(ticks.begin(), ticks.end(), v) == ticks.end())
                        plan.minor.push_back(v);
                }
            }
        }
        return plan;
    }
    const int start = std::max(3, static_cast<int>(length_px / (x_dir ? 70.0 : 42.0)));
    for (int target = start; target >= 3; --target) {
        const double step = nice_step(lo, hi, target);
        std::vector<double> ticks = nice_ticks(lo, hi, target);
        if (a.ticks == Ticks::whole && step < 1.0) {
            ticks.erase(std::remove_if(ticks.begin(), ticks.end(), [](double t) { return t != std::floor(t); }),
                        ticks.end());
        }
        std::vector<std::string> labels = label_all(ticks, step);
        plan.ticks = ticks;
        plan.labels = labels;
        if (fits(ticks, labels)) break;
    }
    return plan;
}

// A polyline's vertices: all of them, or when there are more than kMaxVertices the smallest and
// largest value of each pixel column, in their order along the line.
std::vector<std::size_t> thin(const std::vector<double>& px_x, const std::vector<double>& y) {
    std::vector<std::size_t> keep;
    if (px_x.size() <= kMaxVertices) {
        for (std::size_t i = 0; i < px_x.size(); ++i) keep.push_back(i);
        return keep;
    }
    std::size_t i = 0;
    while (i < px_x.size()) {
        const double column = std::floor(px_x[i]);
        std::size_t lo = i;
        std::size_t hi = i;
        std::size_t j = i;
        for (; j < px_x.size() && std::floor(px_x[j]) == column; ++j) {
            if (y[j] < y[lo]) lo = j;
            if (y[j] > y[hi]) hi = j;
        }
        keep.push_back(std::min(lo, hi));
        if (lo != hi) keep.push_back(std::max(lo, hi));
        i = j;
    }
    return keep;
}

struct LegendEntry {
    const Series* line = nullptr;
    const Markers* markers = nullptr;
    std::string label;
    double x = 0.0;  // offset from the plot's left edge
    int row = 0;
};

std::vector<LegendEntry> plan_legend(const Plot& p, double width_px, int& rows) {
    std::vector<LegendEntry> entries;
    for (const Series& s : p.lines) {
        if (!s.label.empty()) entries.push_back({&s, nullptr, s.label});
    }
    for (const Markers& m : p.markers) {
        if (!m.label.empty()) entries.push_back({nullptr, &m, m.label});
    }
    // All in one row when they fit, else one entry per row (a ragged flow reads badly).
    double total = 0.0;
    for (const LegendEntry& e : entries) total += kLegendSample + 6.0 + text_width(e.label, kLegendFont) + 24.0;
    const bool one_row = total - 24.0 <= width_px;
    double x = 0.0;
    int row = 0;
    for (LegendEntry& e : entries) {
        e.x = one_row ? x : 0.0;
        e.row = one_row ? 0 : row++;
        x += kLegendSample + 6.0 + text_width(e.label, kLegendFont) + 24.0;
    }
    rows = entries.empty() ? 0 : one_row ? 1 : row;
    return entries;
}

std::string marker_shape(const Markers& m) {
    const std::string fill = m.filled ? m.colour : "#ffffff";
    const std::string paint = " fill=\"" + fill + "\" stroke=\"" + m.colour + "\" stroke-width=\"1.8\"";
    const double s = m.size_px;
    switch (m.shape) {
        case Shape::circle: return "<circle r=\"" + px(s) + "\"" + paint + "/>";
        case Shape::square:
            return "<rect x=\"" + px(-s) + "\" y=\"" + px(-s) + "\" width=\"" + px(2 * s) + "\" height=\"" + px(2 * s) +
                   "\"" + paint + "/>";
        case Shape::diamond: {
            const double d = 1.3 * s;
            return "<polygon points=\"0," + px(-d) + " " + px(d) + ",0 0," + px(d) + " " + px(-d) + ",0\"" + paint +
                   "/>";
        }
    }
    return "";
}

std::string text_element(double x, double y, const std::string& text, double font, const std::string& extra) {
    return "<text x=\"" + px(x) + "\" y=\"" + px(y) + "\" font-size=\"" + px(font) + "\"" + extra + ">" + escape(text) +
           "</text>\n";
}

}  // namespace

// ----------------------------------------------------------------------------------- render

std::string render(const Figure& f) {
    if (f.plots.empty()) throw std::logic_error("a figure needs at least one plot");
    const double width = f.width_px;
    const double h = f.plot_height_px;

    // The y axes first: the widest tick label sets the left margin, so the plots line up.
    std::vector<AxisPlan> ys;
    double y_label_w = 0.0;
    double right_label_w = 0.0;
    bool any_right = false;
    for (const Plot& p : f.plots) {
        ys.push_back(plan_axis(p, p.y, false, h));
        for (const std::string& l : ys.back().labels) y_label_w = std::max(y_label_w, text_width(l, kTickFont));
    }
    // Right axes: ticks at nice values of factor × y.
    std::vector<std::pair<std::vector<double>, std::vector<std::string>>> rights(f.plots.size());
    for (std::size_t i = 0; i < f.plots.size(); ++i) {
        const RightAxis& r = f.plots[i].right;
        if (r.factor == 0.0) continue;
        any_right = true;
        const double a = r.factor * ys[i].lo;
        const double b = r.factor * ys[i].hi;
        const double lo = std::min(a, b);
        const double hi = std::max(a, b);
        const int target = std::max(3, static_cast<int>(h / 42.0));
        const double step = nice_step(lo, hi, target);
        for (const double t : nice_ticks(lo, hi, target)) {
            rights[i].first.push_back(t / r.factor);
            rights[i].second.push_back(tick_label(t, step, Ticks::number));
            right_label_w = std::max(right_label_w, text_width(rights[i].second.back(), kTickFont));
        }
    }
    const double left = 30.0 + y_label_w + 12.0;
    const double right_margin = any_right ? 30.0 + right_label_w + 12.0 : 28.0;
    const double area_w = width - left - right_margin;

    std::string body;
    std::string notes_desc;
    double y = 0.0;
    // Title and notes, wrapped to the width.
    // The title and notes start at the page margin, the plots' own titles at their left edge.
    const double margin = 16.0;
    for (const std::string& line : wrap(f.title, kTitleFont, width - 2 * margin, true)) {
        y += kTitleFont + 10.0;
        body += text_element(margin, y, line, kTitleFont, " font-weight=\"bold\" class=\"title\"");
    }
    for (const std::string& note : f.notes) {
        for (const std::string& line : wrap(note, kNoteFont, width - 2 * margin)) {
            y += kNoteFont + 5.0;
            body += text_element(margin, y, line, kNoteFont, " fill=\"#444444\" class=\"note\"");
        }
    }
    y += 14.0;

    int clip_id = 0;
    for (std::size_t pi = 0; pi < f.plots.size(); ++pi) {
        const Plot& p = f.plots[pi];
        AxisPlan xa = plan_axis(p, p.x, true, area_w);
        AxisPlan ya = ys[pi];
        std::string g = "<g class=\"plot\" id=\"plot" + std::to_string(pi + 1) + "\">\n";
        if (!p.title.empty()) {
            y += kPanelTitleFont + 8.0;
            g += text_element(left, y, p.title, kPanelTitleFont, " font-weight=\"bold\" class=\"plot-title\"");
        }
        int rows = 0;
        const std::vector<LegendEntry> legend = plan_legend(p, area_w, rows);
        if (rows > 0) {
            g += "<g class=\"legend\">\n";
            for (const LegendEntry& e : legend) {
                const double ey = y + 8.0 + kLegendRow * (e.row + 1) - 6.0;  // baseline
                const double sx = left + e.x;
                const double sy = ey - 4.5;
                if (e.line != nullptr) {
                    g += "<line x1=\"" + px(sx) + "\" y1=\"" + px(sy) + "\" x2=\"" + px(sx + kLegendSample) +
                         "\" y2=\"" + px(sy) + "\" stroke=\"" + e.line->colour + "\" stroke-width=\"" +
                         px(e.line->width_px) + "\"" + (e.line->dashed ? " stroke-dasharray=\"7 4\"" : "") + "/>\n";
                } else {
                    g += "<g transform=\"translate(" + px(sx + 0.5 * kLegendSample) + "," + px(sy) + ")\">" +
                         marker_shape(*e.markers) + "</g>\n";
                }
                g += text_element(sx + kLegendSample + 6.0, ey, e.label, kLegendFont,
                                  " fill=\"" + std::string(kInk) + "\"");
            }
            g += "</g>\n";
            y += 8.0 + kLegendRow * rows;
        }
        const bool top = !p.top.at.empty();
        y += top ? 50.0 : 10.0;
        const double area_top = y;
        const double area_bottom = y + h;
        xa.p_lo = left;
        xa.p_hi = left + area_w;
        ya.p_lo = area_bottom;
        ya.p_hi = area_top;

        // Plot area, grid, zero line.
        g += "<rect class=\"plot-area\" x=\"" + px(left) + "\" y=\"" + px(area_top) + "\" width=\"" + px(area_w) +
             "\" height=\"" + px(h) + "\" fill=\"#ffffff\" stroke=\"none\"/>\n";
        g += "<g class=\"grid\" stroke=\"" + std::string(kGrid) + "\" stroke-width=\"1\">\n";
        auto vline = [&](double v, const char* colour) {
            return "<line x1=\"" + px(xa.at(v)) + "\" y1=\"" + px(area_top) + "\" x2=\"" + px(xa.at(v)) + "\" y2=\"" +
                   px(area_bottom) + "\"" + (colour ? std::string(" stroke=\"") + colour + "\"" : "") + "/>\n";
        };
        auto hline = [&](double v, const char* colour) {
            return "<line x1=\"" + px(left) + "\" y1=\"" + px(ya.at(v)) + "\" x2=\"" + px(left + area_w) + "\" y2=\"" +
                   px(ya.at(v)) + "\"" + (colour ? std::string(" stroke=\"") + colour + "\"" : "") + "/>\n";
        };
        for (const double v : xa.minor) g += vline(v, "#f0f0f0");
        for (const double v : ya.minor) g += hline(v, "#f0f0f0");
        for (const double v : xa.ticks) g += vline(v, nullptr);
        for (const double v : ya.ticks) g += hline(v, nullptr);
        g += "</g>\n";
        if (p.zero_line && ya.scale == Scale::linear && ya.lo < 0.0 && ya.hi > 0.0) {
            g += "<line class=\"zero\" x1=\"" + px(left) + "\" y1=\"" + px(ya.at(0.0)) + "\" x2=\"" +
                 px(left + area_w) + "\" y2=\"" + px(ya.at(0.0)) + "\" stroke=\"#999999\" stroke-width=\"1.2\"/>\n";
        }

        // Data, clipped to the plot area.
        const std::string clip = "rtline-clip-" + std::to_string(++clip_id);
        g += "<clipPath id=\"" + clip + "\"><rect x=\"" + px(left) + "\" y=\"" + px(area_top) + "\" width=\"" +
             px(area_w) + "\" height=\"" + px(h) + "\"/></clipPath>\n";
        g += "<g clip-path=\"url(#" + clip + ")\">\n";
        for (const Series& s : p.lines) {
            g += "<g class=\"series\" fill=\"none\" stroke=\"" + s.colour + "\" stroke-width=\"" + px(s.width_px) +
                 "\" stroke-linejoin=\"round\" stroke-linecap=\"round\"" +
                 (s.dashed ? " stroke-dasharray=\"7 4\"" : "") + "><title>" + escape(s.label) + "</title>\n";
            // Runs of finite points, each its own polyline.
            std::size_t i = 0;
            std::size_t shown = 0;
            std::size_t total = 0;
            while (i < s.x.size()) {
                std::vector<double> run_x;
                std::vector<double> run_y;
                for (; i < s.x.size(); ++i) {
                    const bool ok = std::isfinite(s.x[i]) && std::isfinite(s.y[i]) &&
                                    (xa.scale == Scale::linear || s.x[i] > 0.0) &&
                                    (ya.scale == Scale::linear || s.y[i] > 0.0);
                    if (!ok) break;
                    run_x.push_back(xa.at(s.x[i]));
                    run_y.push_back(ya.at(s.y[i]));
                }
                ++i;
                if (run_x.empty()) continue;
                const std::vector<std::size_t> keep = thin(run_x, run_y);
                total += run_x.size();
                shown += keep.size();
                g += "<polyline points=\"";
                for (std::size_t k = 0; k < keep.size(); ++k) {
                    if (k > 0) g += ' ';
                    g += px(run_x[keep[k]]) + "," + px(run_y[keep[k]]);
                }
                g += "\"/>\n";
            }
            g += "</g>\n";
            if (shown < total) {
                notes_desc += " '" + s.label + "': " + std::to_string(total) + " points drawn as " +
                              std::to_string(shown) + " vertices (each pixel column's smallest and largest value).";
            }
        }
        for (const Markers& m : p.markers) {
            g += "<g class=\"markers\"><title>" + escape(m.label) + "</title>\n";
            for (std::size_t i = 0; i < m.x.size() && i < m.y.size(); ++i) {
                if (!std::isfinite(m.x[i]) || !std::isfinite(m.y[i])) continue;
                g += "<g transform=\"translate(" + px(xa.at(m.x[i])) + "," + px(ya.at(m.y[i])) + ")\">" +
                     marker_shape(m) + "</g>\n";
            }
            g += "</g>\n";
        }
        g += "</g>\n";
        g += "<rect class=\"frame\" x=\"" + px(left) + "\" y=\"" + px(area_top) + "\" width=\"" + px(area_w) +
             "\" height=\"" + px(h) + "\" fill=\"none\" stroke=\"" + kFrame + "\" stroke-width=\"1\"/>\n";

        // Ticks: each a group placed at its position, so a reader can map labels to pixels.
        auto tick = [&](const char* cls, double tx, double ty, const std::string& line, const std::string& label,
                        const std::string& text_attrs) {
            std::string t = "<g class=\"";
            t += cls;
            t += "\" transform=\"translate(" + px(tx) + "," + px(ty) + ")\">";
            t += line;
            t += "<text" + text_attrs + ">";
            t += escape(label);
            t += "</text></g>\n";
            return t;
        };
        const std::string stroke = " stroke=\"" + std::string(kFrame) + "\"";
        g += "<g class=\"axes\" font-size=\"" + px(kTickFont) + "\" fill=\"" + kInk + "\">\n";
        for (std::size_t i = 0; i < xa.ticks.size(); ++i) {
            g += tick("x-tick", xa.at(xa.ticks[i]), area_bottom, "<line y2=\"5\"" + stroke + "/>", xa.labels[i],
                      " y=\"19\" text-anchor=\"middle\"");
        }
        for (std::size_t i = 0; i < ya.ticks.size(); ++i) {
            g += tick("y-tick", left, ya.at(ya.ticks[i]), "<line x2=\"-5\"" + stroke + "/>", ya.labels[i],
                      " x=\"-8\" y=\"4.5\" text-anchor=\"end\"");
        }
        for (std::size_t i = 0; i < rights[pi].first.size(); ++i) {
            g += tick("right-tick", left + area_w, ya.at(rights[pi].first[i]), "<line x2=\"5\"" + stroke + "/>",
                      rights[pi].second[i], " x=\"8\" y=\"4.5\" text-anchor=\"start\"");
        }
        // The caller places the top ticks (often unevenly): a label too close to the last one drawn is left out.
        std::vector<std::size_t> order;
        for (std::size_t i = 0; i < p.top.at.size() && i < p.top.labels.size(); ++i) order.push_back(i);
        std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return p.top.at[a] < p.top.at[b]; });
        double last_right = -1e300;
        for (const std::size_t i : order) {
            const double tx = xa.at(p.top.at[i]);
            if (tx < left - 0.5 || tx > left + area_w + 0.5) continue;
            const double half = 0.5 * text_width(p.top.labels[i], kTickFont);
            if (tx - half < last_right + 10.0) continue;
            last_right = tx + half;
            g += tick("top-tick", tx, area_top, "<line y2=\"-5\"" + stroke + "/>", p.top.labels[i],
                      " y=\"-9\" text-anchor=\"middle\"");
        }
        g += "</g>\n";
        // Axis labels.
        g += text_element(left + 0.5 * area_w, area_bottom + 42.0, p.x.label, kLabelFont,
                          " text-anchor=\"middle\" class=\"x-label\"");
        g += "<text class=\"y-label\" transform=\"translate(18," + px(area_top + 0.5 * h) +
             ") rotate(-90)\" text-anchor=\"middle\" font-size=\"" + px(kLabelFont) + "\">" + escape(p.y.label) +
             "</text>\n";
        if (p.right.factor != 0.0) {
            g += "<text class=\"right-label\" transform=\"translate(" + px(width - 16.0) + "," +
                 px(area_top + 0.5 * h) + ") rotate(90)\" text-anchor=\"middle\" font-size=\"" + px(kLabelFont) +
                 "\">" + escape(p.right.label) + "</text>\n";
        }
        if (top) {
            g += text_element(left + 0.5 * area_w, area_top - 30.0, p.top.label, kLabelFont,
                              " text-anchor=\"middle\" class=\"top-label\"");
        }
        g += "</g>\n";
        body += g;
        y = area_bottom + 52.0 + 14.0;
    }
    const double height = std::ceil(y);

    std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
    out += "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"" + px(width) + "\" height=\"" +
           px(height) + "\" viewBox=\"0 0 " + px(width) + " " + px(height) +
           "\" font-family=\"DejaVu Sans, Helvetica, Arial, sans-serif\" fill=\"" + kInk + "\">\n";
    out += "<title>" + escape(f.title) + "</title>\n";
    out += "<desc>" + escape(f.description + notes_desc) + "</desc>\n";
    out += "<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n";
    out += body;
    out += "</svg>\n";
    return out;
}

}  // namespace rtline::cli::svg
