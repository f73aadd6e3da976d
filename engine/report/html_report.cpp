// The HTML report: one self-contained page (no external files, fonts or scripts).
#include <cmath>
#include <cstdio>
#include <sstream>

#include "core/text.hpp"
#include "footprint/figures.hpp"
#include "report/cautions.hpp"
#include "report/footprint_report.hpp"
#include "report/report_files.hpp"

namespace strewn {

namespace {

std::string cell(double v, const char* format = "%.1f") {
  if (std::isnan(v)) return "&ndash;";
  if (std::isinf(v)) return v > 0 ? "&infin;" : "&minus;&infin;";
  char text[48];
  std::snprintf(text, sizeof text, format, v);
  return text;
}

// A unit as HTML shows it: "m2" as m&sup2;.
std::string html_unit(std::string_view unit) {
  return unit == "m2" ? std::string("m&sup2;") : std::string(unit);
}

// A column heading of a figure, from its description: its label (or `label`), then a qualifier
// such as "east", then its unit.
std::string heading(std::string_view figure, std::string_view qualifier = {},
                    std::string_view label = {}) {
  const FigureDescription& d = group_figure(figure);
  std::string text(label.empty() ? d.label : label);
  for (const std::string& part : {std::string(qualifier), html_unit(d.unit)})
    if (!part.empty()) {
      text += ' ';
      text += part;
    }
  std::string th = "<th>";
  th += text;
  th += "</th>";
  return th;
}

// Energies span tiny droplets to tonnes: four figures, without an exponent above 1 J.
std::string energy_cell(double v) {
  return std::isfinite(v) ? readable_number(v, 4) : cell(v);
}

const char* kStyle = R"(
body { font: 15px/1.45 Helvetica, Arial, sans-serif; color: #1f2933; margin: 0; background: #f4f1ea; }
main { max-width: 1000px; margin: 0 auto; padding: 24px; background: #ffffff; }
h1 { font-size: 24px; margin: 0 0 4px; } h2 { font-size: 18px; margin: 28px 0 8px; border-bottom: 2px solid #d9cbb0; }
h3 { font-size: 15px; margin: 18px 0 6px; }
.cautions { background: #fff4d6; border-left: 6px solid #c0622b; padding: 10px 16px; margin: 16px 0; }
.cautions li { margin: 4px 0; }
table { border-collapse: collapse; margin: 6px 0 12px; font-size: 14px; }
th, td { padding: 4px 10px; border-bottom: 1px solid #e4e7eb; text-align: right; }
th { background: #ede6d6; } td.name, th.name { text-align: left; }
.within { color: #2f6f3a; font-weight: bold; } .exceeds { color: #a12d2d; font-weight: bold; }
.undetermined { color: #8a6d1f; font-weight: bold; }
figure { margin: 12px 0; } svg { max-width: 100%; height: auto; }
pre { background: #f7f7f2; padding: 10px; overflow-x: auto; font-size: 12px; }
.note { color: #52606d; font-size: 13px; }
#warnings.warnings { background: #fdecea; border-left: 6px solid #a12d2d; padding: 8px 16px; }
#warnings.no-warnings { color: #2f6f3a; }
)";

// The name a reader sees: with one body, "all" is that body.
std::string shown_name(const Footprint& f, const std::string& group) {
  if (group == "all" && f.groups.size() == 2) return f.groups.front().name;
  return group == "all" ? std::string("all bodies (one release)") : group;
}

void warnings_section(std::ostream& h, const StudyRecord& r) {
  const std::vector<std::string> warnings = record_warnings(r);
  h << "<h2>Warnings</h2>\n<section id=\"warnings\" class=\""
    << (warnings.empty() ? "no-warnings" : "warnings") << "\">";
  if (warnings.empty()) {
    h << "<p>None: every sample stayed within its models' ranges and assumptions.</p>";
  } else {
    h << "<p><strong>" << warnings.size() << (warnings.size() == 1 ? " warning" : " warnings")
      << "</strong>: read before the figures.</p><ul>\n";
    for (const auto& w : warnings) h << "<li>" << escape_markup(w) << "</li>\n";
    h << "</ul>";
  }
  h << "</section>\n";
}

void rules_section(std::ostream& h, const StudyRecord& r) {
  const Footprint& f = r.footprint;
  h << "<h2>Against the criteria entered</h2>\n";
  if (f.rules.empty()) {
    h << "<p>No criteria were entered in <code>[rules]</code>.</p>\n";
    return;
  }
  h << "<p class=\"note\">Each criterion is the user's, from local rules. <em>within</em>: the "
       "upper confidence bound of the probability is at or below the accepted value; "
       "<em>exceeds</em>: the lower bound is above it; <em>undetermined</em>: neither, more "
       "samples may decide. The responsible authority decides what is acceptable.</p>\n";
  h << "<table id=\"rules\"><tr><th class=\"name\">group</th><th class=\"name\">criterion</th>"
       "<th>threshold</th><th>accepted probability</th><th>estimate</th><th>lower</th>"
       "<th>upper</th><th class=\"name\">status</th><th class=\"name\">zone about</th></tr>\n";
  for (const auto& k : f.rules) {
    const char* status = to_string(k.status);
    h << "<tr><td class=\"name\">" << escape_markup(shown_name(f, k.group))
      << "</td><td class=\"name\">"
      << (k.rule == "zone_radius" ? "landing outside the planned zone"
                                  : "impact energy above the limit")
      << "</td><td>" << cell(k.threshold, "%g") << (k.rule == "zone_radius" ? " m" : " J")
      << "</td><td>" << cell(k.accepted, "%g") << "</td><td>" << cell(k.value, "%.3g")
      << "</td><td>" << cell(k.lower, "%.3g") << "</td><td>" << cell(k.upper, "%.3g")
      << "</td><td class=\"name " << status << "\">" << status;
    if (k.samples_needed) h << " (about " << k.samples_needed << " samples would decide)";
    h << "</td><td class=\"name\">";
    if (k.rule == "zone_radius")
      for (const auto& g : f.groups)
        if (g.name == k.group) h << escape_markup(centre_text(r, g));
    h << "</td></tr>\n";
  }
  h << "</table>\n";
}

void maps_section(std::ostream& h, const StudyRecord& r) {
  const Footprint& f = r.footprint;
  h << "<h2>Map</h2>\n<p class=\"note\">Centres: ";
  bool first = true;
  for (const GroupFootprint* g : shown_groups(f)) {
    h << (first ? "" : "; ") << "<strong>" << escape_markup(shown_name(f, g->name))
      << "</strong> about " << escape_markup(centre_text(r, *g));
    first = false;
  }
  h << ".</p>\n";
  auto figure = [&](const std::string& group, const std::string& caption) {
    std::string svg = map_svg(r, group);
    svg.erase(0, svg.find("<svg"));  // inline: no XML declaration
    h << "<figure>\n"
      << svg << "<figcaption class=\"note\">" << caption
      << " Hazard polygons hold at least their level of the impacts, counted; dashed circles are "
         "the distribution-free upper bounds of the containment radii (the faint circles their "
         "estimates); dash-dotted circles are the zones of your rules. The Gaussian ellipses are "
         "in the tables.</figcaption>\n"
         "</figure>\n";
  };
  if (f.groups.size() > 2) {
    figure("all", "All bodies of one release together, each weighted by its objects per release.");
    for (std::size_t b = 0; b + 1 < f.groups.size(); ++b)
      figure(f.groups[b].name, "Body " + escape_markup(f.groups[b].name) + " alone.");
  } else {
    figure("all", "");
  }
}

// A group's name as a table cell shows it: escaped, with one body's "all" named as that body.
std::string group_cell(const Footprint& f, const GroupFootprint& g) {
  return escape_markup(shown_name(f, g.name));
}

// From the doctype to the cautions: the title, the case, the counts and what to read first.
void page_head(std::ostream& h, const StudyRecord& r) {
  const Footprint& f = r.footprint;
  const std::string title = r.title.empty() ? "strewn study" : r.title;
  h << "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
    << "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
    << "<title>" << escape_markup(title) << " &ndash; strewn report</title>\n<style>" << kStyle
    << "</style>\n</head>\n<body>\n<main>\n";
  h << "<h1>" << escape_markup(title) << "</h1>\n";
  if (!r.case_label.empty())
    h << "<p id=\"case\"><strong>" << escape_markup(r.case_label) << "</strong></p>\n";
  h << "<p class=\"note\">" << r.samples << " samples, " << r.completed << " landed, " << r.failed
    << " failed; " << escape_markup(r.sampling) << " sampling; bounds at " << f.confidence * 100.0
    << "% confidence; centre " << escape_markup(f.centre) << ".</p>\n";
  h << "<section class=\"cautions\" id=\"cautions\"><strong>Read this first.</strong><ul>\n";
  for (const auto& c : cautions()) h << "<li>" << escape_markup(c) << "</li>\n";
  h << "</ul></section>\n";
}

// The containment table: each level's radius, its bound and interval, and its hazard polygon.
void containment_section(std::ostream& h, const Footprint& f) {
  h << "<h2>Containment</h2>\n<table id=\"containment\"><tr><th class=\"name\">group</th>"
       "<th>level</th>"
    << heading("containment") << heading("containment", "", "upper bound")
    << heading("containment", "", "interval") << heading("polygons") << "<th>"
    << group_figure("polygons").label << " counted</th></tr>\n";
  for (const GroupFootprint* gp : shown_groups(f)) {
    const GroupFootprint& g = *gp;
    for (std::size_t k = 0; k < g.containment.size(); ++k) {
      const auto& c = g.containment[k];
      h << "<tr><td class=\"name\">" << group_cell(f, g) << "</td><td>" << c.level << "</td><td>"
        << cell(c.radius) << "</td><td>"
        << (c.radius_upper ? cell(*c.radius_upper)
                           : "needs " + std::to_string(c.samples_needed) + " samples")
        << "</td><td>" << cell(c.interval_lower) << " &ndash; " << cell(c.interval_upper)
        << "</td>";
      if (k < g.polygons.size() && g.polygons[k].determined)
        h << "<td>" << cell(g.polygons[k].area, "%.0f") << "</td><td>"
          << cell(g.polygons[k].coverage, "%.4f") << "</td>";
      else
        h << "<td colspan=\"2\">"
          << (k < g.polygons.size() ? escape_markup(g.polygons[k].reason) : std::string())
          << "</td>";
      h << "</tr>\n";
    }
  }
  h << "</table>\n";
}

// The dispersion table (means, spreads, CEPs) and the Gaussian ellipses' table under it.
void dispersion_section(std::ostream& h, const Footprint& f) {
  const std::vector<const GroupFootprint*> groups = shown_groups(f);
  h << "<h2>Dispersion</h2>\n<table id=\"dispersion\"><tr><th class=\"name\">group</th>"
    << heading("mean", "east") << heading("mean", "north") << heading("mean", "east", "&sigma;")
    << heading("mean", "north", "&sigma;") << "<th>correlation</th>" << heading("cep")
    << heading("cep_gaussian") << "</tr>\n";
  for (const GroupFootprint* gp : groups) {
    const GroupFootprint& g = *gp;
    const double se = std::sqrt(g.covariance[0]), sn = std::sqrt(g.covariance[2]);
    h << "<tr><td class=\"name\">" << group_cell(f, g) << "</td><td>" << cell(g.mean.east)
      << "</td><td>" << cell(g.mean.north) << "</td><td>" << cell(se) << "</td><td>" << cell(sn)
      << "</td><td>" << cell(se > 0 && sn > 0 ? g.covariance[1] / (se * sn) : NAN, "%.3f")
      << "</td><td>" << cell(g.cep) << "</td><td>" << cell(g.cep_gaussian) << "</td></tr>\n";
  }
  h << "</table>\n<table id=\"ellipses\"><tr><th class=\"name\">group</th><th>level</th>"
    << heading("ellipses", "", "semi-major") << heading("ellipses", "", "semi-minor")
    << "<th>bearing &deg;</th><th>counted inside</th></tr>\n";
  for (const GroupFootprint* gp : groups)
    for (const auto& e : gp->ellipses)
      h << "<tr><td class=\"name\">" << group_cell(f, *gp) << "</td><td>" << e.level << "</td><td>"
        << cell(e.semi_major) << "</td><td>" << cell(e.semi_minor) << "</td><td>"
        << cell(e.bearing, "%.0f") << "</td><td>" << cell(e.counted, "%.4f") << "</td></tr>\n";
  h << "</table>\n";
}

// The downrange and crossrange quantiles about the centre, along the release track.
void ranges_section(std::ostream& h, const Footprint& f) {
  h << "<h3>Downrange and crossrange</h3>\n<p class=\"note\">Downrange along "
    << f.downrange_bearing
    << "&deg; (the release track), crossrange positive to its right and negative to its left, "
       "about the centre.</p>\n"
    << "<table id=\"ranges\"><tr><th class=\"name\">group</th><th>probability</th>"
    << heading("downrange") << heading("downrange", "", "interval") << heading("crossrange")
    << heading("crossrange", "", "interval") << "</tr>\n";
  for (const GroupFootprint* gp : shown_groups(f)) {
    const GroupFootprint& g = *gp;
    for (std::size_t k = 0; k < g.downrange.size() && k < g.crossrange.size(); ++k) {
      const auto& d = g.downrange[k];
      const auto& c = g.crossrange[k];
      h << "<tr><td class=\"name\">" << group_cell(f, g) << "</td><td>" << d.probability
        << "</td><td>" << cell(d.value) << "</td><td>" << cell(d.lower) << " &ndash; "
        << cell(d.upper) << "</td><td>" << cell(c.value) << "</td><td>" << cell(c.lower)
        << " &ndash; " << cell(c.upper) << "</td></tr>\n";
    }
  }
  h << "</table>\n";
}

// Impact speed and energy quantiles, then the energy exceedance and the time of flight.
void energy_section(std::ostream& h, const Footprint& f) {
  const std::vector<const GroupFootprint*> groups = shown_groups(f);
  h << "<h2>Impact speed and energy</h2>\n<table id=\"energy\"><tr><th class=\"name\">group</th>"
       "<th>level</th>"
    << heading("speed") << "<th>upper bound</th>" << heading("energy")
    << "<th>upper bound</th></tr>\n";
  for (const GroupFootprint* gp : groups) {
    const GroupFootprint& g = *gp;
    for (std::size_t k = 0; k < g.speed.size() && k < g.energy.size(); ++k) {
      const auto& sp = g.speed[k];
      const auto& en = g.energy[k];
      h << "<tr><td class=\"name\">" << group_cell(f, g) << "</td><td>" << sp.level << "</td><td>"
        << cell(sp.radius) << "</td><td>" << (sp.radius_upper ? cell(*sp.radius_upper) : "&ndash;")
        << "</td><td>" << energy_cell(en.radius) << "</td><td>"
        << (en.radius_upper ? energy_cell(*en.radius_upper) : "&ndash;") << "</td></tr>\n";
    }
  }
  h << "</table>\n<table id=\"exceedance\"><tr><th class=\"name\">group</th>"
    << heading("energy", "", "threshold") << heading("energy_exceedance")
    << "<th>lower</th><th>upper</th>" << heading("time") << "</tr>\n";
  for (const GroupFootprint* gp : groups) {
    const GroupFootprint& g = *gp;
    const auto& x = g.energy_exceedance;
    h << "<tr><td class=\"name\">" << group_cell(f, g) << "</td><td>" << cell(x.threshold, "%g")
      << "</td><td>" << cell(x.share, "%.4g") << "</td><td>" << cell(x.lower, "%.3g") << "</td><td>"
      << cell(x.upper, "%.3g") << "</td><td>" << cell(g.time_min) << " &ndash; " << cell(g.time_max)
      << "</td></tr>\n";
  }
  h << "</table>\n<p class=\"note\">The energy threshold is a generic screening figure; replace "
       "it by the one your local rules set.</p>\n";
}

// The sensitivity table: each input's rank correlations with the impact, body by body.
void sensitivity_section(std::ostream& h, const Footprint& f) {
  h << "<h2>What drives the spread</h2>\n<p class=\"note\">Body by body, strongest first: "
       "Spearman rank correlation of each sampled input and random choice with the impact's "
       "downrange, crossrange, distance from the centre and energy (landed flights); for a "
       "category, such as an ensemble member, the correlation ratio (0 to 1).</p>\n"
       "<table id=\"sensitivity\"><tr><th class=\"name\">body</th>"
       "<th class=\"name\">input</th><th>downrange</th><th>crossrange</th><th>distance</th>"
       "<th>energy</th></tr>\n";
  for (const GroupFootprint* gp : shown_groups(f))
    for (const auto& x : gp->sensitivity) {
      const char* format = x.categorical ? "%.2f" : "%+.2f";
      h << "<tr><td class=\"name\">" << group_cell(f, *gp) << "</td><td class=\"name\">"
        << escape_markup(x.input) << (x.categorical ? " (category)" : "") << "</td><td>"
        << cell(x.downrange, format) << "</td><td>" << cell(x.crossrange, format) << "</td><td>"
        << cell(x.distance, format) << "</td><td>" << cell(x.energy, format) << "</td></tr>\n";
    }
  h << "</table>\n";
}

// The provenance table and the scenario text as read, which close the page.
void provenance_section(std::ostream& h, const StudyRecord& r) {
  h << "<h2>Provenance</h2>\n<table id=\"provenance\">\n";
  auto row = [&](const char* label, const std::string& value) {
    h << "<tr><td class=\"name\">" << label << "</td><td class=\"name\">" << escape_markup(value)
      << "</td></tr>\n";
  };
  row("results file", r.file);
  row("engine version", r.engine_version);
  row("created", r.created);
  row("seed", std::to_string(r.seed));
  row("samples", std::to_string(r.samples) +
                     (r.rounds > 1 ? " (grown in " + std::to_string(r.rounds) + " parts)" : ""));
  row("threads", std::to_string(r.threads));
  row("scenario SHA-256", r.scenario_sha256);
  h << "</table>\n<details><summary>Scenario as read</summary>\n<pre>"
    << escape_markup(r.scenario_text) << "</pre></details>\n";
}

}  // namespace

std::string html_report(const StudyRecord& r) {
  std::ostringstream h;
  page_head(h, r);
  warnings_section(h, r);
  // Rules next: they are what the reader came for.
  rules_section(h, r);
  maps_section(h, r);
  containment_section(h, r.footprint);
  dispersion_section(h, r.footprint);
  ranges_section(h, r.footprint);
  energy_section(h, r.footprint);
  sensitivity_section(h, r.footprint);
  provenance_section(h, r);
  h << "</main>\n</body>\n</html>\n";
  return h.str();
}

}  // namespace strewn
