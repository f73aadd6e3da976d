// Scenario loading: TOML (toml++) into the validated Scenario model. Every problem is collected
// with its key path and line; nothing is thrown until the whole file has been read.
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include "core/text.hpp"
#include "medium/us1976.hpp"
#include "scenario/reader.hpp"
#include "scenario/scenario.hpp"
#include "scenario/table_file.hpp"
#include "scenario/terrain_ground.hpp"
#include "scenario/world.hpp"

namespace strewn {

using namespace toml_input;

int Scenario::body_index(const std::string& name) const {
  for (std::size_t i = 0; i < bodies.size(); ++i)
    if (bodies[i].name == name) return static_cast<int>(i);
  return -1;
}

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr Bounds kLatitude{-90.0, 90.0, false, false, "a latitude in [-90, 90] degrees"};
constexpr Bounds kLongitude{-180.0, 180.0, false, false, "a longitude in [-180, 180] degrees"};
constexpr Bounds kOpenUnit{0.0, 1.0, true, true, "a probability strictly between 0 and 1"};
constexpr Bounds kTemperatureOffset{-100.0, 100.0, false, false, "an offset in [-100, 100] K"};
// The release's place, motion and timing, bounded so that every value `check` accepts also flies
// and reports: offsets within 10 000 km of the site keep metres exact in double precision (the
// flat local frame is far less accurate there, which the range warnings say; a release point
// 10^15 m away once ended a run with an internal error after every flight), and no carrier of an
// aerial release or a terminated flight moves faster than 3 km/s or releases an hour off time.
constexpr Bounds kReleaseOffset{-1e7, 1e7, false, false,
                                "within 10 000 km of the site, in [-10000000, 10000000] m"};
constexpr Bounds kCarrierSpeed{0.0, 3000.0, false, false, "a speed in [0, 3000] m/s"};
constexpr Bounds kClimbRate{-3000.0, 3000.0, false, false, "a climb rate in [-3000, 3000] m/s"};
constexpr Bounds kReleaseDelay{-3600.0, 3600.0, false, false, "a delay in [-3600, 3600] s"};
constexpr Bounds kCorrelation{-1.0, 1.0, false, false, "a correlation in [-1, 1]"};

class Loader {
 public:
  Loader(const std::string& text, const std::string& path) : diagnostics_(path), path_(path) {
    scenario_.path = path;
    scenario_.text = text;
    scenario_.files_read.push_back(path);
    folder_ = std::filesystem::path(path).parent_path();
  }

  Scenario load() {
    // Names and titles go to HDF5, JSON, SVG and the terminal, which all need UTF-8: text in
    // another encoding is refused here, with its line, rather than failing in a writer later.
    if (const auto bad = invalid_utf8_at(scenario_.text); bad != std::string::npos) {
      // The bad byte is not a line feed: the line starts after the last one before it.
      const auto line_feed = scenario_.text.rfind('\n', bad);
      const std::size_t column = line_feed == std::string::npos ? bad + 1 : bad - line_feed;
      diagnostics_.add(
          "",
          static_cast<long>(std::count(scenario_.text.begin(),
                                       scenario_.text.begin() + static_cast<long>(bad), '\n')) +
              1,
          "byte " + std::to_string(column) +
              " of the line is not UTF-8 text; a scenario is a UTF-8 TOML file (was it "
              "saved in another encoding?)");
      throw ScenarioError(diagnostics_.take());
    }
    toml::table root;
    try {
      root = toml::parse(scenario_.text, path_);
    } catch (const toml::parse_error& error) {
      const auto line = static_cast<long>(error.source().begin.line);
      diagnostics_.add(key_on_line(line), line,
                       "TOML syntax error: " + std::string(error.description()));
      throw ScenarioError(diagnostics_.take());
    }
    Table top(diagnostics_, &root, "", 1);
    if (const toml::node* n = top.node("title")) {
      // The title is an attribute of the results file, whose attributes share one object header
      // of 64 KiB (HDF5 File Format Specification, object headers; from memory): a title far below
      // that, refused here rather than when the file is written after every flight.
      constexpr std::size_t kLongestTitle = 4096;
      if (const auto* s = n->as_string(); s && s->get().find('\0') != std::string::npos)
        diagnostics_.add("title", n,
                         "must not hold a NUL character (\\u0000): the results file would keep "
                         "only the text before it");
      else if (s && s->get().size() > kLongestTitle)
        diagnostics_.add("title", n,
                         "is " + std::to_string(s->get().size()) +
                             " bytes long; a title may have at most " +
                             std::to_string(kLongestTitle));
      else if (s)
        scenario_.title = s->get();
      else
        diagnostics_.add("title", n, "expected a string");
    }
    read_site(top.table("site"));
    read_medium(top.table("medium"));
    read_wind(top.table("wind"));
    read_release(top.table("release"), top.has("release"));
    read_bodies(top);
    read_study(top.table("study"));
    read_rules(top.table("rules"));
    read_output(top.table("output"));
    read_correlations(top);
    top.finish();
    read_terrain_raster();
    cross_checks();
    if (!diagnostics_.empty()) throw ScenarioError(diagnostics_.take());
    return std::move(scenario_);
  }

 private:
  // A sampled input is registered under its name (body inputs by the body's name) and given its
  // handle, its place among the sampled inputs.
  Uncertain sampled(const std::string& name, Uncertain u) {
    if (!u.is_fixed()) {
      u.mark_sampled(scenario_.sampled_inputs.size());
      scenario_.sampled_inputs.push_back({name, u});
    }
    return u;
  }

  std::string resolve(const std::string& file) const {
    std::filesystem::path p(file);
    if (p.is_relative()) p = (folder_ / p).lexically_normal();
    return p.string();
  }
  // A table the scenario reads: resolved, and remembered among the files it reads.
  std::string read_from(const std::string& file) {
    const std::string path = resolve(file);
    scenario_.files_read.push_back(path);
    return path;
  }

  void read_site(Table site) {
    if (auto lat = site.number("latitude", kLatitude)) scenario_.site.latitude = lat;
    if (auto lon = site.number("longitude", kLongitude)) scenario_.site.longitude = lon;
    if (site.has("latitude") != site.has("longitude"))
      diagnostics_.add(site.key_path(site.has("latitude") ? "longitude" : "latitude"), site.line(),
                       "latitude and longitude go together: give both or neither");
    // The ground: the kind its keys choose, read as that kind declares them; the keys of other
    // kinds are named as theirs.
    const auto has = [&](const char* key) { return site.has(key); };
    const std::size_t kind = GroundKindsOf::choose(has);
    std::array<double, kMaxGroundKeys> values{};
    const auto keys = GroundKindsOf::keys(kind);
    for (std::size_t k = 0; k < keys.size(); ++k) {
      if (keys[k].file) {  // a raster, read once the rest of the scenario is known
        values[k] = std::numeric_limits<double>::quiet_NaN();
        if (auto file = site.text(keys[k].key, {}, keys[k].required)) {
          if (file->empty()) {
            diagnostics_.add(site.key_path(keys[k].key), site.line_of(keys[k].key),
                             "is empty: give the path of an elevation raster");
            continue;
          }
          scenario_.site.terrain = *file;
          scenario_.site.terrain_path = read_from(*file);
          terrain_line_ = site.line_of(keys[k].key);
        }
        continue;
      }
      values[k] =
          site.number(keys[k].key, keys[k].bounds, keys[k].required).value_or(keys[k].fallback);
    }
    ground_values_.assign(values.begin(), values.begin() + static_cast<long>(keys.size()));
    for (const auto& [key, message] : GroundKindsOf::keys_of_others(kind, has)) {
      site.mark(key);
      diagnostics_.add(site.key_path(key), site.line_of(key), message);
    }
    scenario_.site.ground =
        GroundKindsOf::make(kind, std::span<const double>(values.data(), keys.size()));
    site.finish();
  }

  // The terrain raster of a terrain ground, over the reach of the flights (worked out from the
  // nominal flights unless site.terrain_reach gives it): refused with the key and the reason.
  // With other problems already found the nominal flights cannot be trusted: the raster is then
  // only opened and checked.
  void read_terrain_raster() {
    if (scenario_.site.terrain_path.empty()) return;
    if (!scenario_.site.latitude) {
      diagnostics_.add("site.terrain", terrain_line_,
                       "needs the site's latitude and longitude: they place the frame on the "
                       "raster");
      return;
    }
    const double reach = ground_values_.size() > 1 ? ground_values_[1] : 0.0;
    try {
      if (diagnostics_.empty()) {
        read_terrain_ground(scenario_, reach);
      } else {
        Scenario probe = scenario_;
        probe.bodies.clear();
        read_terrain_ground(probe, kLeastTerrainReach);
      }
    } catch (const InputFileError& error) {
      diagnostics_.add("site.terrain", terrain_line_, error.what());
    }
  }

  void read_medium(Table medium) {
    auto& m = scenario_.medium;
    const auto model = medium.text("model", enum_names<Medium::Kind>());
    m.model = enum_from_name<Medium::Kind>(model.value_or("")).value_or(Medium::Kind::us1976);
    m.density_factor =
        sampled("medium.density_factor", medium.uncertain("density_factor", 1.0, kPositive));
    const bool gas = m.model != Medium::Kind::uniform;
    if (gas) {
      m.temperature_offset =
          sampled("medium.temperature_offset",
                  medium.uncertain("temperature_offset", 0.0, kTemperatureOffset));
    }
    if (m.model == Medium::Kind::profile) {
      if (auto file = medium.text("profile", {}, true)) {
        m.profile_file = *file;
        read_profile(read_from(*file), medium.key_path("profile"), medium.line_of("profile"));
      }
    }
    if (m.model == Medium::Kind::uniform) {
      m.density = medium.number("density", kPositive, true).value_or(1.0);
      m.viscosity = medium.number("viscosity", kPositive, true).value_or(1.0);
      m.sound_speed = medium.number("sound_speed", kInf, kPositive);
    }
    // Keys of the other models are named as such rather than as unknown.
    const std::map<std::string, std::string> owner{{"profile", "profile"},
                                                   {"density", "uniform"},
                                                   {"viscosity", "uniform"},
                                                   {"sound_speed", "uniform"},
                                                   {"temperature_offset", "us1976 or profile"}};
    for (const auto& [key, models] : owner) {
      if (medium.has(key) && !medium_uses(m.model, key)) {
        medium.mark(key);
        diagnostics_.add(
            medium.key_path(key), medium.line_of(key),
            "is used only by model " + models + ", not by \"" + model.value_or("us1976") + "\"");
      }
    }
    medium.finish();
  }

  static bool medium_uses(Medium::Kind kind, const std::string& key) {
    if (key == "profile") return kind == Medium::Kind::profile;
    if (key == "temperature_offset") return kind != Medium::Kind::uniform;
    return kind == Medium::Kind::uniform;
  }

  void read_profile(const std::string& file, const std::string& key, long line) {
    try {
      // Pressure is optional: without it the sounding is balanced hydrostatically from the
      // standard atmosphere's pressure at its lowest level.
      const auto table = read_table_file(file, {"altitude_m", "temperature_K", "pressure_Pa"}, 2);
      const bool has_pressure = table.present[2];
      std::vector<SoundingLevel> levels;
      for (const auto& row : table.rows)
        levels.push_back({row.values[0], row.values[1], row.values[2]});
      for (std::size_t i = 0; i < levels.size(); ++i) {
        const auto& l = levels[i];
        const std::string where = file + ":" + std::to_string(table.rows[i].line) + ": ";
        if (!(l.temperature > 0.0 && (!has_pressure || l.pressure > 0.0)))
          diagnostics_.add(key, line,
                           where + (has_pressure ? "temperature and pressure must be positive"
                                                 : "temperature must be positive"));
        if (i > 0 && !(l.altitude > levels[i - 1].altitude))
          diagnostics_.add(key, line, where + "altitudes must increase strictly down the file");
        // Hydrostatic balance: pressure falls with height everywhere in a real atmosphere; a
        // level with more pressure than the one below it is a mistake in the file (columns
        // swapped, a unit of hPa among Pa).
        else if (has_pressure && i > 0 && !(l.pressure < levels[i - 1].pressure))
          diagnostics_.add(key, line,
                           where + "pressure " + format_number(l.pressure) +
                               " Pa does not fall from the " +
                               format_number(levels[i - 1].pressure) +
                               " Pa of the level below; pressure must fall with height");
      }
      if (!has_pressure && !levels.empty() &&
          !(levels.front().altitude >= us1976::lowest_altitude &&
            levels.front().altitude <= us1976::highest_altitude))
        diagnostics_.add(key, line,
                         file +
                             ": a sounding without column \"pressure_Pa\" starts from the "
                             "standard atmosphere's pressure at its lowest level, so that "
                             "level must lie within -5000 .. 86000 m");
      if (levels.size() < 2)
        diagnostics_.add(key, line, file + ": a sounding needs at least two levels");
      scenario_.medium.profile = std::move(levels);
    } catch (const TableFileError& error) {
      diagnostics_.add(key, line, error.what());
    }
  }

  std::vector<WindLayer> read_wind_file(const std::string& file, const std::string& key,
                                        long line) {
    std::vector<WindLayer> layers;
    try {
      const auto table = read_table_file(file, {"altitude_m", "speed_ms", "from_deg"});
      for (const auto& row : table.rows) {
        const WindLayer layer{row.values[0], row.values[1], row.values[2]};
        const std::string where = file + ":" + std::to_string(row.line) + ": ";
        if (!(layer.speed >= 0.0))
          diagnostics_.add(key, line, where + "speed must be zero or more");
        if (!(layer.from >= 0.0 && layer.from <= 360.0))
          diagnostics_.add(key, line, where + "direction must be in [0, 360] degrees");
        if (!layers.empty() && !(layer.altitude > layers.back().altitude))
          diagnostics_.add(key, line, where + "altitudes must increase strictly down the file");
        layers.push_back(layer);
      }
      if (layers.empty()) diagnostics_.add(key, line, file + ": no wind levels in the file");
    } catch (const TableFileError& error) {
      diagnostics_.add(key, line, error.what());
    }
    return layers;
  }

  void read_wind(Table wind) {
    auto& w = scenario_.wind;
    if (const toml::array* layers = wind.array("layers")) {
      for (std::size_t i = 0; i < layers->size(); ++i) {
        const toml::node* item = layers->get(i);
        const std::string path = wind.key_path("layers") + "[" + std::to_string(i) + "]";
        if (!item->is_table()) {
          diagnostics_.add(path, item,
                           "expected a table { altitude = ..., speed = ..., from = ... }");
          continue;
        }
        Table layer(diagnostics_, item->as_table(), path, line_of(item));
        auto altitude = layer.number("altitude", kAltitude, true);
        auto speed = layer.number("speed", kNonNegative, true);
        auto from = layer.number("from", kDegrees, true);
        layer.finish();
        if (!(altitude && speed && from)) continue;
        if (!w.layers.empty() && !(*altitude > w.layers.back().altitude)) {
          diagnostics_.add(path + ".altitude", layer.line_of("altitude"),
                           *altitude == w.layers.back().altitude
                               ? "duplicated altitude " + format_number(*altitude) +
                                     ": each layer needs its own altitude"
                               : "layers must be sorted by increasing altitude (" +
                                     format_number(*altitude) + " follows " +
                                     format_number(w.layers.back().altitude) + ")");
          continue;
        }
        w.layers.push_back({*altitude, *speed, *from});
      }
    }
    if (auto file = wind.text("file")) {
      if (wind.has("layers"))
        diagnostics_.add(wind.key_path("file"), wind.line_of("file"),
                         "give the wind either as layers or as a file, not both");
      w.file = *file;
      w.layers = read_wind_file(read_from(*file), wind.key_path("file"), wind.line_of("file"));
    }
    read_wind_uncertainty(wind.table("uncertainty"));
    wind.finish();
  }

  // [wind.uncertainty], read by the wind source its model names (scenario/wind_sources/): the
  // loader lends it the table, the sampled-input register and the reading of profile files.
  class WindKeys final : public WindSourceKeys {
   public:
    WindKeys(Loader& loader, Table& table, std::string model)
        : loader_(loader), table_(table), model_(std::move(model)) {}
    double number(const char* key, const Bounds& bounds, bool required, double fallback) override {
      return table_.number(key, bounds, required).value_or(fallback);
    }
    Uncertain sampled(const char* name, Uncertain input) override {
      return loader_.sampled(std::string("wind.") + name, input);
    }
    WindFiles profile_files(const char* key) override {
      WindFiles files;
      const toml::array* list = table_.array(key);
      if (list == nullptr) {
        loader_.diagnostics_.add(table_.key_path(key), table_.line(),
                                 "is required for model \"" + model_ + "\" (a list of wind files)");
        return files;
      }
      for (std::size_t i = 0; i < list->size(); ++i) {
        const toml::node* item = list->get(i);
        const std::string path = table_.key_path(key) + "[" + std::to_string(i) + "]";
        if (!item->is_string()) {
          loader_.diagnostics_.add(path, item, "expected a file name");
          continue;
        }
        const std::string name = item->as_string()->get();
        files.names.push_back(name);
        files.layers.push_back(
            loader_.read_wind_file(loader_.read_from(name), path, line_of(item)));
      }
      if (list->empty())
        loader_.diagnostics_.add(table_.key_path(key), table_.line_of(key), "lists no profile");
      return files;
    }

   private:
    Loader& loader_;
    Table& table_;
    std::string model_;
  };

  void read_wind_uncertainty(Table u) {
    const std::vector<std::string> names = wind_source_names();
    const std::string model = u.text("model", names).value_or(names.front());
    // An unknown model is reported by text() and read as the default ("none").
    WindKeys keys(*this, u, model);
    scenario_.wind.uncertainty = read_wind_source(model, keys).value();
    for (const auto& [key, used] : wind_source_keys(scenario_.wind.uncertainty)) {
      if (u.has(key) && !used) {
        u.mark(key);
        diagnostics_.add(u.key_path(key), u.line_of(key),
                         std::string("is not used by wind uncertainty model \"") +
                             wind_source_name(scenario_.wind.uncertainty) + "\"");
      }
    }
    u.finish();
  }

  void read_release(Table release, bool present) {
    auto& r = scenario_.release;
    if (!present) diagnostics_.add("release", 0L, "the [release] section is required");
    auto input = [&](const char* key, double fallback, const Bounds& bounds) {
      return sampled(std::string("release.") + key, release.uncertain(key, fallback, bounds));
    };
    if (present && release.has("height_above_ground")) {
      // m above the ground under the release point, rather than above mean sea level.
      r.above_ground = true;
      if (release.has("altitude")) {
        release.mark("altitude");
        diagnostics_.add(release.key_path("altitude"), release.line_of("altitude"),
                         "give the release's altitude (m above mean sea level) or its "
                         "height_above_ground (m above the ground under the release point), not "
                         "both");
      }
      if (auto height = release.uncertain("height_above_ground", kHeightAboveGround, true))
        r.altitude = sampled("release.height_above_ground", *height);
    } else if (present) {
      auto altitude = release.uncertain("altitude", kAltitude, true);
      if (altitude) r.altitude = sampled("release.altitude", *altitude);
    }
    r.east = input("east", 0.0, kReleaseOffset);
    r.north = input("north", 0.0, kReleaseOffset);
    r.speed = input("speed", 0.0, kCarrierSpeed);
    r.track = input("track", 0.0, kDegrees);
    r.climb = input("climb", 0.0, kClimbRate);
    r.along_error = input("along_error", 0.0, kReleaseOffset);
    r.cross_error = input("cross_error", 0.0, kReleaseOffset);
    r.delay = input("delay", 0.0, kReleaseDelay);
    Table burst = release.table("burst");
    if (burst.present()) {
      r.has_burst = true;
      r.burst_speed = sampled("release.burst.speed",
                              burst.uncertain("speed", kCarrierSpeed, true).value_or(0.0));
    }
    burst.finish();
    release.finish();
  }

  void read_bodies(Table& top) {
    auto bodies = top.tables("body");
    if (bodies.empty() && !top.has("body"))
      diagnostics_.add("body", 0L, "at least one [[body]] is required");
    // Each body's name and inputs are listed in the results file's attributes and its footprint
    // has a group per body: a release of many kinds of objects is described by fewer bodies with
    // a count each.
    constexpr std::size_t kMostBodies = 256;
    if (bodies.size() > kMostBodies)
      diagnostics_.add("body", 0L,
                       std::to_string(bodies.size()) + " bodies; a scenario may have at most " +
                           std::to_string(kMostBodies) +
                           " (give identical objects one body and a count)");
    for (std::size_t i = 0; i < bodies.size(); ++i) read_body(bodies[i], i, bodies.size());
  }

  void read_body(Table& t, std::size_t index, std::size_t total) {
    BodySpec b;
    const auto name = t.text("name", {}, total > 1);
    b.name = name.value_or(total > 1 ? "body" + std::to_string(index) : "body");
    if (name && (name->empty() || name->find_first_of(". \t/") != std::string::npos))
      diagnostics_.add(t.key_path("name"), t.line_of("name"),
                       "must be a non-empty name without dots, spaces or slashes (it names the "
                       "body's inputs, e.g. \"" +
                           b.name + ".mass\")");
    // A name is part of input names, map file names (<map>-<name>.svg) and table cells: short.
    constexpr std::size_t kLongestName = 64;
    if (name && name->size() > kLongestName)
      diagnostics_.add(t.key_path("name"), t.line_of("name"),
                       "is " + std::to_string(name->size()) +
                           " characters long; a body's name "
                           "may have at most 64");
    if (b.name == "all")
      diagnostics_.add(t.key_path("name"), t.line_of("name"),
                       "\"all\" is reserved for the footprint of every body together");
    // The sections' names start the names of their inputs ("release.altitude", "wind.bias_east",
    // "medium.density_factor"): a body so named would make "<name>.<input>" ambiguous, and the
    // sensitivities of each body, which take its inputs by that prefix, wrong.
    for (const char* section :
         {"release", "wind", "medium", "site", "study", "rules", "output", "correlation"})
      if (name && *name == section)
        diagnostics_.add(t.key_path("name"), t.line_of("name"),
                         "\"" + *name +
                             "\" is the name of a section of the scenario, which starts the "
                             "names of its inputs; choose another name for the body");
    // A name is shown in terminals, maps and tables and names files: nothing in it may act on a
    // terminal or reorder the text around it.
    if (name && (printable(*name) != *name || name->find('\n') != std::string::npos))
      diagnostics_.add(t.key_path("name"), t.line_of("name"),
                       "must not hold control characters, line breaks or marks that reorder text "
                       "(it is shown on maps and terminals and names files)");
    if (scenario_.body_index(b.name) >= 0 && name) {
      diagnostics_.add(t.key_path("name"), t.line_of("name"),
                       "duplicate body name \"" + b.name + "\": each [[body]] needs its own name");
    } else if (name && !name->empty() && printable(*name) == *name) {
      // Names that differ only in case, width or invisible characters would be one name to a
      // reader and one map file (<map>-<name>.svg) where case is ignored.
      const std::string key = name_key(b.name);
      if (key.empty())
        diagnostics_.add(t.key_path("name"), t.line_of("name"),
                         "has no visible character once normalised (Unicode NFKC with case "
                         "folding); give the body a name that can be read");
      for (const auto& other : scenario_.bodies)
        if (!key.empty() && name_key(other.name) == key)
          diagnostics_.add(t.key_path("name"), t.line_of("name"),
                           "\"" + b.name + "\" is the same name as body \"" + other.name +
                               "\" once case, width and invisible characters are set aside "
                               "(Unicode NFKC with case folding): their map files "
                               "(<map>-<name>.svg) would be one file where case is ignored; "
                               "choose names that differ otherwise");
    }
    b.count = t.integer("count", 1, 1000000).value_or(1);
    const std::string prefix = b.name + ".";
    if (auto mass = t.uncertain("mass", kPositive, true)) b.mass = sampled(prefix + "mass", *mass);

    Table drag = t.table("drag");
    if (!drag.present())
      diagnostics_.add(t.key_path("drag"), t.line(), "is required ([body.drag] with a model)");
    else
      read_drag(drag, prefix + "drag.", b);
    drag.finish();

    Table chute = t.table("parachute");
    if (chute.present()) b.parachute = read_parachute(chute, prefix + "parachute.");
    chute.finish();
    t.finish();
    scenario_.bodies.push_back(std::move(b));
  }

  // [body.drag]: the model, then the keys that its law declares (each an uncertain input,
  // checked against the law's bounds), a Mach table where the law takes one, and a message for
  // every key that belongs to another law.
  void read_drag(Table& drag, const std::string& prefix, BodySpec& b) {
    const auto model_name = drag.text("model", drag_model_names(), true);
    const auto model = drag_model_named(model_name.value_or(""));
    // The Mach table is read whatever the model, so that a misspelt model is the one message.
    if (const toml::array* table = drag.array("mach_table")) {
      if (model && !drag_model_facts(*model).takes_mach_table)
        diagnostics_.add(drag.key_path("mach_table"), drag.line_of("mach_table"),
                         "a Mach table does not apply to drag model \"" + *model_name + "\"");
      read_mach_table(*table, drag.key_path("mach_table"), b);
    }
    if (!model) return;
    b.drag_model = *model;
    const DragModelFacts& law = drag_model_facts(b.drag_model);
    std::vector<std::string> used;
    for (std::size_t i = 0; i < law.inputs.size(); ++i) {
      const DragInput& input = law.inputs[i];
      used.emplace_back(input.key);
      if (input.required) {
        if (auto u = drag.uncertain(input.key, input.bounds, true))
          b.drag_inputs[i] = sampled(prefix + input.key, *u);
      } else {
        b.drag_inputs[i] =
            sampled(prefix + input.key, drag.uncertain(input.key, input.fallback, input.bounds));
      }
    }
    std::vector<std::string> reported;
    for (DragModel other = 0; other < kDragModels; ++other)
      for (const DragInput& input : drag_model_facts(other).inputs) {
        const std::string key = input.key;
        if (!drag.has(key) || std::find(used.begin(), used.end(), key) != used.end() ||
            std::find(reported.begin(), reported.end(), key) != reported.end())
          continue;
        drag.mark(key);
        reported.push_back(key);
        diagnostics_.add(
            drag.key_path(key), drag.line_of(key),
            "is not used by drag model \"" + *model_name + "\" (it takes " + join(used) + ")");
      }
  }

  static std::string join(const std::vector<std::string>& words) {
    std::string out;
    for (std::size_t i = 0; i < words.size(); ++i)
      out += (i == 0 ? "" : i + 1 == words.size() ? " and " : ", ") + words[i];
    return out;
  }

  void read_mach_table(const toml::array& table, const std::string& path, BodySpec& b) {
    std::vector<double> mach, factor;
    bool ok = true;
    for (std::size_t i = 0; i < table.size(); ++i) {
      const toml::node* row = table.get(i);
      const std::string row_path = path + "[" + std::to_string(i) + "]";
      const auto* pair = row->as_array();
      std::optional<double> m, f;
      if (pair && pair->size() == 2) {
        m = as_number(*pair->get(0));
        f = as_number(*pair->get(1));
      }
      if (!(m && f)) {
        diagnostics_.add(row_path, row, "expected a pair [mach, factor] of numbers");
        ok = false;
        continue;
      }
      if (!(std::isfinite(*m) && *m >= 0.0)) {
        diagnostics_.add(row_path, row, "Mach number must be finite and zero or more");
        ok = false;
      }
      if (!(std::isfinite(*f) && *f > 0.0)) {
        diagnostics_.add(row_path, row, "factor must be finite and positive");
        ok = false;
      }
      if (!mach.empty() && !(*m > mach.back())) {
        diagnostics_.add(row_path, row, "Mach numbers must increase strictly down the table");
        ok = false;
      }
      mach.push_back(*m);
      factor.push_back(*f);
    }
    if (mach.empty()) {
      diagnostics_.add(path, line_of(&table), "lists no [mach, factor] pair");
      ok = false;
    }
    if (ok) b.mach_table = std::make_shared<const MachTable>(mach, factor);
  }

  ParachuteSpec read_parachute(Table& c, const std::string& prefix) {
    ParachuteSpec p;
    const bool by_time = c.has("deploy_after"), by_height = c.has("deploy_height");
    if (by_time && by_height)
      diagnostics_.add(c.key_path("deploy_height"), c.line_of("deploy_height"),
                       "give deploy_after or deploy_height, not both");
    if (!by_time && !by_height)
      diagnostics_.add(c.key_path("deploy_after"), c.line(),
                       "is required (s after release), or deploy_height (m above ground)");
    if (by_time) {
      p.trigger = Canopy::Trigger::time;
      p.deploy_after =
          sampled(prefix + "deploy_after", c.uncertain("deploy_after", 0.0, kNonNegative));
    }
    if (by_height) {
      p.trigger = Canopy::Trigger::height;
      p.deploy_height =
          sampled(prefix + "deploy_height", c.uncertain("deploy_height", 0.0, kPositive));
    }
    p.fill_time = sampled(prefix + "fill_time", c.uncertain("fill_time", 0.0, kNonNegative));
    if (auto area = c.uncertain("drag_area", kPositive, true))
      p.drag_area = sampled(prefix + "drag_area", *area);
    p.partial_probability = c.number("partial_probability", 0.0, kProbability);
    p.failure_probability = c.number("failure_probability", 0.0, kProbability);
    if (p.partial_probability + p.failure_probability > 1.0)
      diagnostics_.add(c.key_path("failure_probability"), c.line_of("failure_probability"),
                       "partial_probability + failure_probability must not exceed 1 (got " +
                           format_number(p.partial_probability + p.failure_probability) + ")");
    if (c.has("partial_drag_area")) {
      p.partial_drag_area =
          sampled(prefix + "partial_drag_area", c.uncertain("partial_drag_area", 0.0, kPositive));
    } else if (p.partial_probability > 0.0) {
      diagnostics_.add(
          c.key_path("partial_drag_area"), c.line(),
          "is required when partial_probability is above 0 (Cd S of a partly open canopy, m^2)");
    }
    return p;
  }

  void read_study(Table s) {
    auto& st = scenario_.study;
    st.samples = s.integer("samples", 1, 2000000000L).value_or(st.samples);
    st.samples_line = s.line_of("samples");
    st.max_samples_line = s.line_of("max_samples");
    if (const toml::node* n = s.node("seed")) {
      const auto* i = n->as_integer();
      if (!i || i->get() < 0)
        diagnostics_.add(s.key_path("seed"), n, "expected a whole number, zero or more");
      else
        st.seed = static_cast<std::uint64_t>(i->get());
    }
    const auto plan = s.text("sampling", enum_names<SamplingPlan>());
    st.sampling = enum_from_name<SamplingPlan>(plan.value_or("")).value_or(SamplingPlan::random);
    if (auto levels = s.numbers("levels", kOpenUnit)) {
      if (levels->empty())
        diagnostics_.add(s.key_path("levels"), s.line_of("levels"), "lists no level");
      else
        st.levels = *levels;
    }
    st.confidence = s.number("confidence", st.confidence, kOpenUnit);
    if (const toml::node* n = s.node("centre")) {
      if (const auto* text = n->as_string()) {
        if (text->get() == "mean" || text->get() == "nominal")
          st.centre = text->get();
        else
          diagnostics_.add(s.key_path("centre"), n,
                           "expected \"mean\", \"nominal\" or { east = ..., north = ... }");
      } else if (n->is_table()) {
        Table point = s.table("centre");
        st.centre = "point";
        st.centre_east = point.number("east", kAny, true).value_or(0.0);
        st.centre_north = point.number("north", kAny, true).value_or(0.0);
        point.finish();
      } else {
        diagnostics_.add(s.key_path("centre"), n,
                         "expected \"mean\", \"nominal\" or { east = ..., north = ... }");
      }
    }
    st.tolerance = s.number("tolerance", st.tolerance,
                            Bounds{1e-6, 100.0, false, false, "a tolerance from 1e-6 to 100 m"});
    st.energy_threshold = s.number("energy_threshold", st.energy_threshold, kNonNegative);
    // A cell below a millimetre is far below the impacts' accuracy (study.tolerance is at least a
    // micrometre, a flight's spread metres) and would make the map's cells countless.
    constexpr Bounds kGridCell{0.001, kInf, false, false, "at least 0.001 m"};
    st.grid = s.number("grid", st.grid, kGridCell);
    if (auto w = s.number("target_width", kOpenUnit)) st.target_width = w;
    st.max_samples = s.integer("max_samples", 1, 2000000000L).value_or(st.max_samples);
    st.max_failed = s.number("max_failed", st.max_failed, kProbability);
    if (st.target_width && st.sampling != SamplingPlan::random)
      diagnostics_.add(s.key_path("target_width"), s.line_of("target_width"),
                       "adding samples until the bounds are tight needs sampling = \"random\" (a "
                       "latin or Sobol design cannot be extended, and the bounds assume "
                       "independent samples)");
    if (st.target_width && st.max_samples < st.samples)
      diagnostics_.add(s.key_path("max_samples"), s.line_of("max_samples"),
                       "is below study.samples (" + std::to_string(st.samples) + ")");
    s.finish();
  }

  void read_rules(Table r) {
    auto& rules = scenario_.rules;
    if (auto v = r.number("zone_radius", kPositive)) rules.zone_radius = v;
    if (auto v = r.number("max_outside", kProbability)) rules.max_outside = v;
    if (auto v = r.number("energy_limit", kPositive)) rules.energy_limit = v;
    if (auto v = r.number("max_exceed", kProbability)) rules.max_exceed = v;
    auto pair = [&](const char* a, const char* b, bool has_a, bool has_b) {
      if (has_a != has_b)
        diagnostics_.add(r.key_path(has_a ? b : a), r.line(),
                         std::string("goes with ") + (has_a ? a : b) + ": give both");
    };
    pair("zone_radius", "max_outside", r.has("zone_radius"), r.has("max_outside"));
    pair("energy_limit", "max_exceed", r.has("energy_limit"), r.has("max_exceed"));
    r.finish();
  }

  void read_output(Table o) {
    if (auto file = o.text("file")) {
      // Like every path in a scenario, relative to the scenario's own folder.
      scenario_.output.file = resolve(*file);
      scenario_.output.file_line = o.line_of("file");
    }
    if (auto samples = o.boolean("samples")) scenario_.output.samples = *samples;
    if (auto compress = o.boolean("compress")) scenario_.output.compress = *compress;
    o.finish();
  }

  void read_correlations(Table& top) {
    for (auto& c : top.tables("correlation")) {
      CorrelationSpec spec;
      const toml::array* between = c.array("between");
      if (!between) {
        diagnostics_.add(c.key_path("between"), c.line(), "is required: two sampled input names");
      } else if (between->size() != 2 || !between->get(0)->is_string() ||
                 !between->get(1)->is_string()) {
        diagnostics_.add(c.key_path("between"), line_of(between),
                         "expected two sampled input names");
      } else {
        spec.key_path = c.key_path("between");
        spec.line = line_of(between);
        spec.first = between->get(0)->as_string()->get();
        spec.second = between->get(1)->as_string()->get();
      }
      spec.rho = c.number("rho", kCorrelation, true).value_or(0.0);
      c.finish();
      if (!spec.first.empty()) scenario_.correlations.push_back(spec);
    }
  }

  // The release above the ground and within the sounding. A terrain that could not be read has
  // no heights to check against (its problem is said already).
  void check_release_against_ground() {
    const auto& r = scenario_.release;
    if (const auto* terrain = std::get_if<TerrainGround>(&scenario_.site.ground);
        terrain && !terrain->surface)
      return;
    const double ground = scenario_.site.ground_level();
    // The ground under the nominal release point (for a level ground its one altitude).
    const ReleaseState nominal =
        release_state(r.altitude.nominal(), r.east.nominal(), r.north.nominal(), r.speed.nominal(),
                      r.track.nominal(), r.climb.nominal(), r.along_error.nominal(),
                      r.cross_error.nominal(), r.delay.nominal());
    const double ground_there = std::visit(
        [&](const auto& g) { return g.height(nominal.position.x(), nominal.position.y()); },
        scenario_.site.ground);
    const bool level = std::holds_alternative<LevelGround>(scenario_.site.ground);
    const char* key = r.above_ground ? "height_above_ground" : "altitude";
    if (std::isnan(ground_there)) {
      diagnostics_.add(std::string("release.") + key, line_for("release", key),
                       "the terrain read has no height under the nominal release point");
      return;
    }
    if (!r.above_ground && (r.altitude.probability_below(ground + 1e-9) > kOutsideTolerance ||
                            r.altitude.nominal() <= ground_there)) {
      // Release below the ground: refused when any real share of the release altitudes is
      // below the lowest ground, or the nominal release is below the ground under it.
      const bool under = r.altitude.nominal() <= ground_there;
      diagnostics_.add("release.altitude", line_for("release", "altitude"),
                       "the release (nominal " + format_number(r.altitude.nominal()) +
                           " m) must be above the ground at " +
                           format_number(under ? ground_there : ground) +
                           " m above mean sea level" +
                           (level   ? " (site.ground)"
                            : under ? " (the terrain under the nominal release point)"
                                    : " (the lowest terrain read)"));
    }
    // A height above a high terrain may put the release above the atmosphere's top: the
    // altitude, not only the height, must stay within the models' range.
    if (r.above_ground &&
        (r.altitude.nominal() + ground_there > kAltitude.high ||
         r.altitude.probability_above(kAltitude.high - ground_there) > kOutsideTolerance))
      diagnostics_.add(
          "release.height_above_ground", line_for("release", "height_above_ground"),
          "the release may reach " + format_number(r.altitude.nominal() + ground_there) +
              " m above mean sea level (nominal height plus the terrain's " +
              format_number(ground_there) + " m); the atmosphere ends at " +
              format_number(kAltitude.high) + " m, so truncate the height with max = " +
              format_number(kAltitude.high - ground_there));
    if (scenario_.medium.model != Medium::Kind::profile || scenario_.medium.profile.size() < 2)
      return;
    // Every release altitude a study may draw must lie within the sounding (the same share as
    // the physical ranges allow, 1e-6), not only the nominal one. A height above the ground is
    // taken above the ground under the nominal release point.
    const double lift = r.above_ground ? ground_there : 0.0;
    const auto& levels = scenario_.medium.profile;
    const double top = levels.back().altitude;
    if (ground < levels.front().altitude || r.altitude.nominal() + lift > top)
      diagnostics_.add("medium.profile", line_for("medium", "profile"),
                       "the sounding covers " + format_number(levels.front().altitude) + " .. " +
                           format_number(top) + " m; it must reach from the ground (" +
                           format_number(ground) + " m) to the release altitude (nominal " +
                           format_number(r.altitude.nominal() + lift) + " m)");
    else if (r.altitude.probability_above(top - lift) > kOutsideTolerance)
      diagnostics_.add(std::string("release.") + key, line_for("release", key),
                       "the release altitude may reach above the sounding's top at " +
                           format_number(top) + " m (probability " +
                           printf_text("%.3g", r.altitude.probability_above(top - lift)) +
                           "); extend the sounding, or truncate the " + key +
                           " with max = " + format_number(top - lift));
  }

  void cross_checks() {
    check_release_against_ground();
    // Correlations must name sampled inputs, each pair once.
    std::vector<std::string> names;
    for (const auto& s : scenario_.sampled_inputs) names.push_back(s.name);
    for (const auto& c : scenario_.correlations) {
      for (const auto* name : {&c.first, &c.second}) {
        if (std::find(names.begin(), names.end(), *name) != names.end()) continue;
        std::string message = "\"" + *name + "\" is not a sampled input";
        const std::string guess = closest_match(*name, names);
        if (!guess.empty())
          message += "; did you mean \"" + guess + "\"?";
        else
          message +=
              " (sampled inputs are those given as distributions; `strewn check` lists them)";
        diagnostics_.add(c.key_path, c.line, message);
      }
      if (c.first == c.second) diagnostics_.add(c.key_path, c.line, "names the same input twice");
    }
  }

  // The key path written on a line of the text ("release.speed" for `speed = ...` under
  // [release]), for messages about lines the TOML parser could not read; empty when none.
  std::string key_on_line(long wanted) const {
    std::istringstream in(scenario_.text);
    std::string line, section;
    for (long number = 1; std::getline(in, line); ++number) {
      const auto first = line.find_first_not_of(" \t");
      if (first == std::string::npos) continue;
      if (line[first] == '[') {
        const auto open = line.find_first_not_of("[ \t", first);
        const auto close = line.find(']', first);  // missing in a broken header: take the rest
        if (open != std::string::npos && (close == std::string::npos || close > open)) {
          section =
              line.substr(open, close == std::string::npos ? std::string::npos : close - open);
          section.erase(section.find_last_not_of(" \t\r") + 1);
        }
        if (number == wanted) return section;
        continue;
      }
      if (number != wanted) continue;
      const auto end = line.find_first_of(" \t=", first);
      const std::string key =
          line.substr(first, end == std::string::npos ? std::string::npos : end - first);
      if (key.empty() || key.find_first_not_of(
                             "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789_-.") !=
                             std::string::npos)
        return section;
      return section.empty() ? key : section + "." + key;
    }
    return "";
  }

  long line_for(const char* section, const char* key) const {
    // Finds the line of section.key in the text for messages raised after reading.
    const std::string header = std::string("[") + section + "]";
    std::istringstream in(scenario_.text);
    std::string line;
    long number = 0;
    bool inside = false;
    while (std::getline(in, line)) {
      ++number;
      const auto first = line.find_first_not_of(" \t");
      if (first == std::string::npos) continue;
      if (line[first] == '[')
        inside = line.compare(first, header.size(), header) == 0;
      else if (inside && line.compare(first, std::string(key).size(), key) == 0)
        return number;
    }
    return 0;
  }

  Diagnostics diagnostics_;
  std::string path_;
  std::filesystem::path folder_;
  Scenario scenario_;
  std::vector<double> ground_values_;  // the values of the ground's keys, as read
  long terrain_line_ = 0;
};

}  // namespace

Scenario parse_scenario(const std::string& text, const std::string& path) {
  Loader loader(text, path);
  return loader.load();
}

Scenario load_scenario(const std::string& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec))
    throw ScenarioError({{path, "", 0, "is a folder, not a scenario file"}});
  // A regular file of sane size only: /dev/zero or a pipe would be read for ever.
  if (std::filesystem::exists(path, ec) && !std::filesystem::is_regular_file(path, ec))
    throw ScenarioError({{path, "", 0, "is not a regular file (a scenario is a TOML file)"}});
  if (std::filesystem::exists(path, ec) && std::filesystem::file_size(path, ec) > (16u << 20))
    throw ScenarioError({{path, "", 0, "is larger than 16 MiB; a scenario is a small TOML file"}});
  std::ifstream in(path, std::ios::binary);
  if (!in) throw ScenarioError({{path, "", 0, "cannot be read (no such file, or no permission)"}});
  std::ostringstream buffer;
  buffer << in.rdbuf();
  const std::string text = buffer.str();
  if (text.empty())
    throw ScenarioError(
        {{path, "", 0, "is empty: a scenario needs at least [release] and a [[body]]"}});
  if (text.find('\0') != std::string::npos)
    throw ScenarioError({{path, "", 0, "is a binary file, not a TOML scenario"}});
  return parse_scenario(text, path);
}

}  // namespace strewn
