#include "io/schedule_file.hpp"

#include <algorithm>
#include <cfloat>
#include <cmath>

#include <fmt/format.h>

#include "io/toml_reader.hpp"

namespace gapwise {
namespace {

constexpr const char* kFormat = "gapwise-schedule";
// Like A = 0 at the start of a forward anneal (refused when the run starts), a
// B(s) that is zero everywhere makes every prediction meaningless.
constexpr const char* kZeroProblemScale =
    "B(s) is 0 at every s: the problem Hamiltonian never acts, so no anneal can prefer its ground state "
    "(gaps, durations and predictions would all be meaningless)";

void check_scale(const TomlReader& r, const toml::node* node, const std::string& key, double ghz) {
  if (ghz < 0) r.fail(node, key, fmt::format("energy scale {} GHz is negative", ghz), "energy scales are >= 0 GHz");
  if (ghz > kMaxEnergyScaleGhz)
    r.fail(node, key, fmt::format("energy scale {} GHz is above {:g} GHz", ghz, kMaxEnergyScaleGhz),
           "check the unit: energy scales are in GHz (energy / Planck's constant)");
}

EnergyScales read_scales(const TomlReader& r, const toml::table* t) {
  if (!t) return EnergyScales::linear(5.0, 5.0);
  const std::string kind = r.get_string(*t, "kind", "scales").value_or("linear");
  if (kind == "linear") {
    r.allow_keys(*t, "scales", {"kind", "a_max_ghz", "b_max_ghz"});
    const double a = r.require_double(*t, "a_max_ghz", "scales");
    const double b = r.require_double(*t, "b_max_ghz", "scales");
    check_scale(r, t->get("a_max_ghz"), "scales.a_max_ghz", a);
    check_scale(r, t->get("b_max_ghz"), "scales.b_max_ghz", b);
    if (b == 0)
      r.fail(t->get("b_max_ghz"), "scales.b_max_ghz", kZeroProblemScale,
             "give the problem Hamiltonian's scale B at s = 1 in GHz, e.g. b_max_ghz = 5");
    return EnergyScales::linear(a, b);
  }
  if (kind != "table")
    r.fail(t->get("kind"), "scales.kind", fmt::format("unknown kind \"{}\"", kind), "use \"linear\" or \"table\"");
  r.allow_keys(*t, "scales", {"kind", "interpolation", "s", "a_ghz", "b_ghz"});
  const std::string interp = r.get_string(*t, "interpolation", "scales").value_or("monotone-cubic");
  if (interp != "monotone-cubic" && interp != "linear")
    r.fail(t->get("interpolation"), "scales.interpolation", fmt::format("unknown interpolation \"{}\"", interp),
           "use \"monotone-cubic\" or \"linear\"");
  std::vector<double> cols[3];
  const char* names[3] = {"s", "a_ghz", "b_ghz"};
  for (int c = 0; c < 3; ++c) {
    const toml::array* a = r.get_array(*t, names[c], "scales");
    if (!a) r.fail(t, fmt::format("scales.{}", names[c]), "required key is missing",
                   fmt::format("add `{} = [ ... ]` to [scales]", names[c]));
    cols[c] = r.number_list(*a, fmt::format("scales.{}", names[c]));
    if (c > 0 && cols[c].size() != cols[0].size())
      r.fail(a, fmt::format("scales.{}", names[c]),
             fmt::format("{} values but s has {}", cols[c].size(), cols[0].size()), "give one value per s");
    for (std::size_t k = 0; k < cols[c].size(); ++k) {
      const std::string key = fmt::format("scales.{}[{}]", names[c], k);
      if (c == 0 && (cols[0][k] < 0 || cols[0][k] > 1))
        r.fail(a->get(k), key, fmt::format("s = {} is outside [0, 1]", cols[0][k]), "use s between 0 and 1");
      if (c == 0 && k > 0 && !(cols[0][k] > cols[0][k - 1]))
        r.fail(a->get(k), key, "s values must increase strictly", "sort the table by s and remove repeats");
      // Closer points make the interpolant's slopes overflow (found by fuzzing: s = 0 then 5e-324).
      if (c == 0 && k > 0 && cols[0][k] - cols[0][k - 1] < 1e-9)
        r.fail(a->get(k), key,
               fmt::format("s = {} lies within 1e-9 of the previous point {}", cols[0][k], cols[0][k - 1]),
               "table points must be at least 1e-9 apart in s: merge or remove the near-duplicate");
      if (c > 0) check_scale(r, a->get(k), key, cols[c][k]);
    }
  }
  if (cols[0].size() < 2) r.fail(t->get("s"), "scales.s", "a table needs at least two points", "add points");
  if (std::all_of(cols[2].begin(), cols[2].end(), [](double b) { return b == 0; }))
    r.fail(t->get("b_ghz"), "scales.b_ghz", kZeroProblemScale,
           "give B(s), the problem Hamiltonian's scale in GHz, rising to its full value at s = 1");
  return EnergyScales::table(cols[0], cols[1], cols[2],
                             interp == "linear" ? ScaleInterpolation::Linear : ScaleInterpolation::MonotoneCubic);
}

/// The shape tables of [path], when any is present (see path_shapes.hpp).
std::optional<PathShapeSpec> read_shape_tables(const TomlReader& r, const toml::table& p) {
  const toml::table* pause = r.get_table(p, "pause", "path");
  const toml::table* quench = r.get_table(p, "quench", "path");
  const toml::table* reverse = r.get_table(p, "reverse", "path");
  if (!pause && !quench && !reverse) return std::nullopt;
  if (p.get("points"))
    r.fail(p.get("points"), "path.points", "waypoints and shape tables ([path.pause], [path.quench], [path.reverse]) are both given",
           "describe the path one way: either `points`, or the shape tables");
  if (reverse && (pause || quench))
    r.fail(pause ? pause : quench, pause ? "path.pause" : "path.quench",
           "a reverse anneal cannot also have a forward pause or quench",
           "remove the table; a reverse anneal's pause is its `dwell`");
  PathShapeSpec spec;
  if (pause) {
    r.allow_keys(*pause, "path.pause", {"s", "duration"});
    spec.forward.pause = PauseSpec{r.require_double(*pause, "s", "path.pause"), r.require_double(*pause, "duration", "path.pause")};
  }
  if (quench) {
    r.allow_keys(*quench, "path.quench", {"s", "duration"});
    spec.forward.quench =
        QuenchSpec{r.require_double(*quench, "s", "path.quench"), r.require_double(*quench, "duration", "path.quench")};
  }
  if (reverse) {
    r.allow_keys(*reverse, "path.reverse", {"turn_s", "down", "dwell", "up"});
    ReverseSpec rs;
    rs.turn_s = r.require_double(*reverse, "turn_s", "path.reverse");
    rs.down = r.require_double(*reverse, "down", "path.reverse");
    rs.dwell = r.require_double(*reverse, "dwell", "path.reverse");
    rs.up = r.get_double(*reverse, "up", "path.reverse").value_or(rs.down);
    spec.reverse = rs;
  }
  return spec;
}

/// Builds the path of a shape spec; a refused shape is re-raised at its line.
AnnealPath build_shape(const TomlReader& r, const toml::table& p, const PathShapeSpec& spec, double total) {
  try {
    return path_from_shape(spec, total);
  } catch (const InputError& e) {
    // e's key is "pause.s", "reverse.dwell", ...: find that node under [path].
    const std::string& key = e.place().key;
    const toml::node* node = &p;
    const auto dot = key.find('.');
    if (const toml::table* t = r.get_table(p, key.substr(0, dot), "path")) {
      node = t;
      if (dot != std::string::npos)
        if (const toml::node* leaf = t->get(key.substr(dot + 1))) node = leaf;
    }
    r.fail(node, "path." + key, e.problem(), e.fix());
  }
}

}  // namespace

Schedule parse_schedule_text(std::string_view text, const std::string& name) {
  const TomlReader r = TomlReader::from_string(text, name);
  const toml::table& root = r.root();
  r.allow_keys(root, "", {"format", "format_version", "description", "scales", "path"});
  r.check_format(root, kFormat, "schedule", /*required=*/false);

  Schedule sch;
  sch.source = name;
  sch.description = r.get_string(root, "description", "").value_or("");
  sch.scales = read_scales(r, r.get_table(root, "scales", ""));

  const toml::table* p = r.get_table(root, "path", "");
  toml::table empty;
  if (!p) p = &empty;
  r.allow_keys(*p, "path", {"time", "duration_ns", "points", "start", "start_bits", "pause", "quench", "reverse"});
  const std::optional<PathShapeSpec> spec = read_shape_tables(r, *p);
  const std::string time = r.get_string(*p, "time", "path").value_or("fraction");
  if (time != "fraction" && time != "ns")
    r.fail(p->get("time"), "path.time", fmt::format("unknown time unit \"{}\"", time), "use \"fraction\" or \"ns\"");
  sch.time_in_ns = time == "ns";
  if (auto d = r.get_double(*p, "duration_ns", "path")) {
    check_duration_ns(*d, r.place(p->get("duration_ns"), "path.duration_ns"));
    // The command line's floor for duration lists (src/cli/value_lists.cpp): a
    // file's duration below it could not hold the path's waypoints apart. (The
    // library itself still takes such durations: they give the sudden limit.)
    if (*d < DBL_MIN)
      r.fail(p->get("duration_ns"), "path.duration_ns",
             fmt::format("{} ns is below the smallest duration gapwise accepts ({:.2g} ns, the smallest double held "
                         "at full precision)",
                         *d, DBL_MIN),
             "give a duration of at least 1e-12 ns: every shorter run gives the sudden limit (the start state, "
             "unchanged)");
    const bool forward_shape_in_ns = spec && !spec->is_reverse();
    if (sch.time_in_ns && !forward_shape_in_ns)
      r.fail(p->get("duration_ns"), "path.duration_ns",
             spec ? "duration_ns is implied by down + dwell + up when time = \"ns\"" : "duration_ns is implied when time = \"ns\"",
             "remove duration_ns, or use time = \"fraction\"");
    sch.duration_ns = *d;
  }

  std::vector<Waypoint> pts;
  if (const toml::array* a = r.get_array(*p, "points", "path")) {
    for (std::size_t k = 0; k < a->size(); ++k) {
      const std::string key = fmt::format("path.points[{}]", k);
      const toml::array* e = a->get(k)->as_array();
      if (!e || e->size() != 2) r.fail(a->get(k), key, "each waypoint must be [time, s]", "write it as [t, s]");
      Waypoint w{r.number(*e->get(0), key), r.number(*e->get(1), key)};
      if (w.s < 0 || w.s > 1) r.fail(e->get(1), key, fmt::format("s = {} is outside [0, 1]", w.s), "use s in [0, 1]");
      if (k == 0 && w.t_ns != 0) r.fail(e->get(0), key, "the path must start at time 0", "make the first time 0");
      if (k > 0 && !(w.t_ns > pts.back().t_ns))
        r.fail(e->get(0), key, fmt::format("time {} does not increase (previous {})", w.t_ns, pts.back().t_ns),
               "times must increase strictly; a quench is a short ramp, not a zero-length one");
      if (sch.time_in_ns && w.t_ns > kMaxDurationNs)
        r.fail(e->get(0), key,
               fmt::format("time {} ns is beyond the {:g} ns (one second) gapwise simulates", w.t_ns, kMaxDurationNs),
               "check the unit: times are in ns when time = \"ns\"");
      if (!sch.time_in_ns && w.t_ns > 1)
        r.fail(e->get(0), key, fmt::format("time fraction {} is above 1", w.t_ns),
               "fractions run from 0 to 1; use time = \"ns\" for absolute times");
      pts.push_back(w);
    }
    if (pts.size() < 2) r.fail(a, "path.points", "a path needs at least two waypoints", "add waypoints");
    if (!sch.time_in_ns && pts.back().t_ns != 1.0)
      r.fail(a->get(a->size() - 1), fmt::format("path.points[{}]", a->size() - 1),
             "the last time fraction must be 1", "end the path at time 1 (the full duration)");
    sch.shape = AnnealPath(pts);
  }
  if (spec) {
    double total = 1.0;
    if (spec->is_reverse()) {
      total = spec->reverse->total();
      if (!sch.time_in_ns && std::abs(total - 1.0) > 1e-9)
        r.fail(p->get("reverse"), "path.reverse",
               fmt::format("down + dwell + up = {} but with time = \"fraction\" they must add up to 1", total),
               "make the three fractions add up to 1, or use time = \"ns\"");
      if (sch.time_in_ns && !(total <= kMaxDurationNs))
        r.fail(p->get("reverse"), "path.reverse",
               fmt::format("down + dwell + up = {} ns is longer than the {:g} ns (one second) gapwise simulates", total,
                           kMaxDurationNs),
               "give the durations in ns (a value in seconds or ps is a unit slip)");
    } else if (sch.time_in_ns) {
      if (!sch.duration_ns)
        r.fail(p, "path.duration_ns", "a forward shape with time = \"ns\" needs its total duration",
               "add `duration_ns = <ns>` to [path]");
      total = *sch.duration_ns;
    }
    sch.shape = build_shape(r, *p, *spec, total);
    if (spec->is_reverse() && !sch.time_in_ns) {  // fractions end at exactly 1
      std::vector<Waypoint> w = sch.shape.scaled_to(1.0).points();
      w.back().t_ns = 1.0;
      if (!(w.back().t_ns > w[w.size() - 2].t_ns))
        r.fail(p->get("reverse"), "path.reverse", "the last ramp is too short to resolve in double precision",
               "give `up` a fraction above 1e-12");
      sch.shape = AnnealPath(std::move(w));
    }
    sch.shape_spec = spec;
  }

  const AnnealPath& shape = sch.shape;
  if (shape.s_min() < sch.scales.s_first() - 1e-12 || shape.s_max() > sch.scales.s_last() + 1e-12)
    r.fail(root.get("scales"), "scales.s",
           fmt::format("the table covers s in [{}, {}] but the path visits [{}, {}]", sch.scales.s_first(),
                       sch.scales.s_last(), shape.s_min(), shape.s_max()),
           "extend the table to cover every s the path visits");

  if (p->get("points"))
    sch.path_place = r.place(p->get("points"), "path.points");
  else if (spec)
    for (const char* k : {"reverse", "pause", "quench"})
      if (p->get(k)) {
        sch.path_place = r.place(p->get(k), std::string("path.") + k);
        break;
      }
  if (p->get("start"))
    sch.start_place = r.place(p->get("start"), "path.start");
  else if (p->get("start_bits"))
    sch.start_place = r.place(p->get("start_bits"), "path.start_bits");
  // start_bits alone reads as a classical start only where the path itself says
  // so (it starts above s = 0, as a reverse anneal does): on a forward path it
  // would silently replace the usual start in the transverse field's ground state.
  if (p->get("start_bits") && !p->get("start") && shape.points().front().s == 0.0)
    r.fail(p->get("start_bits"), "path.start_bits",
           "start_bits is given without `start` on a path that starts at s = 0, where it is ambiguous: a forward "
           "anneal from the transverse field's ground state, or a start in these bits",
           "add `start = \"classical\"` to [path] to start in start_bits, or remove start_bits to start in the "
           "ground state");
  const std::string start = r.get_string(*p, "start", "path").value_or(p->get("start_bits") ? "classical" : "ground");
  if (start != "ground" && start != "classical")
    r.fail(p->get("start"), "path.start", fmt::format("unknown start \"{}\"", start), "use \"ground\" or \"classical\"");
  sch.start.kind = start == "ground" ? StartKind::Ground : StartKind::Classical;
  if (const toml::array* b = r.get_array(*p, "start_bits", "path")) {
    if (sch.start.kind == StartKind::Ground)
      r.fail(b, "path.start_bits", "start_bits given but start = \"ground\"", "remove start_bits or set start = \"classical\"");
    for (std::size_t k = 0; k < b->size(); ++k) {
      const long long v = r.integer(*b->get(k), fmt::format("path.start_bits[{}]", k));
      if (v != 0 && v != 1) r.fail(b->get(k), fmt::format("path.start_bits[{}]", k), "a bit must be 0 or 1", "write 0 or 1");
      sch.start.bits.push_back(static_cast<int>(v));
    }
  }
  if (spec && spec->is_reverse() && sch.start.kind == StartKind::Ground)
    r.fail(p->get("reverse"), "path.start_bits", "a reverse anneal ([path.reverse]) needs a classical start state",
           "add `start_bits = [0, 1, ...]` (qubit 0 first) to [path]");
  if (sch.start.kind == StartKind::Classical && sch.start.bits.empty())
    r.fail(p, "path.start_bits", "start = \"classical\" needs the start state", "add `start_bits = [0, 1, ...]`, qubit 0 first");
  if (sch.start.kind == StartKind::Ground && !p->get("start") && shape.points().front().s > 0)
    r.fail(p->get("points"), "path.start_bits",
           fmt::format("the path starts at s = {}: a reverse anneal needs a classical start state",
                       shape.points().front().s),
           "add `start_bits = [...]` (qubit 0 first), or `start = \"ground\"` to start in the ground state of H(s)");
  return sch;
}

Schedule read_schedule_file(const std::string& path) { return parse_schedule_text(read_text_file(path), path); }

std::string format_schedule_toml(const Schedule& s) {
  if (s.duration_ns) check_duration_ns(*s.duration_ns, {s.source, 0, 0, "path.duration_ns"});
  std::string out = fmt::format("format = \"{}\"\nformat_version = 1\n", kFormat);
  if (!s.description.empty()) out += "description = " + toml_quoted(s.description) + "\n";
  out += "\n[scales]\n";
  if (s.scales.is_linear_ramp()) {
    out += fmt::format("kind = \"linear\"\na_max_ghz = {:.17g}\nb_max_ghz = {:.17g}\n", s.scales.a_max_ghz(),
                       s.scales.b_max_ghz());
  } else {
    out += fmt::format("kind = \"table\"\ninterpolation = \"{}\"\n",
                       s.scales.interpolation() == ScaleInterpolation::Linear ? "linear" : "monotone-cubic");
    auto list = [](const std::vector<double>& v) {
      std::string l = "[";
      for (std::size_t k = 0; k < v.size(); ++k) l += fmt::format("{}{:.17g}", k ? ", " : "", v[k]);
      return l + "]";
    };
    out += "s = " + list(s.scales.table_s()) + "\na_ghz = " + list(s.scales.table_a()) + "\nb_ghz = " +
           list(s.scales.table_b()) + "\n";
  }
  out += fmt::format("\n[path]\ntime = \"{}\"\n", s.time_in_ns ? "ns" : "fraction");
  if (s.duration_ns)
    out += fmt::format("duration_ns = {:.17g}\n", *s.duration_ns);
  else if (s.shape_spec && s.time_in_ns && !s.shape_spec->is_reverse())
    out += fmt::format("duration_ns = {:.17g}\n", s.shape.duration_ns());
  if (!s.shape_spec) {
    out += "points = [\n";
    for (const auto& w : s.shape.points()) out += fmt::format("  [{:.17g}, {:.17g}],\n", w.t_ns, w.s);
    out += "]\n";
  }
  if (s.start.kind == StartKind::Classical) {
    out += "start = \"classical\"\nstart_bits = [";
    for (std::size_t k = 0; k < s.start.bits.size(); ++k) out += fmt::format("{}{}", k ? ", " : "", s.start.bits[k]);
    out += "]\n";
  }
  if (s.shape_spec) {
    const PathShapeSpec& sp = *s.shape_spec;
    if (sp.forward.pause)
      out += fmt::format("\n[path.pause]\ns = {:.17g}\nduration = {:.17g}\n", sp.forward.pause->s, sp.forward.pause->duration);
    if (sp.forward.quench)
      out += fmt::format("\n[path.quench]\ns = {:.17g}\nduration = {:.17g}\n", sp.forward.quench->s,
                         sp.forward.quench->duration);
    if (sp.reverse)
      out += fmt::format("\n[path.reverse]\nturn_s = {:.17g}\ndown = {:.17g}\ndwell = {:.17g}\nup = {:.17g}\n",
                         sp.reverse->turn_s, sp.reverse->down, sp.reverse->dwell, sp.reverse->up);
  }
  // What gapwise writes it must read back: the reader's own checks, before the
  // text reaches a file (a generated path with a non-finite time, say).
  try {
    (void)parse_schedule_text(out, "the schedule being written");
  } catch (const InputError& e) {
    throw InputError({s.source, 0, 0, e.place().key},
                     "the schedule to be written would be refused when read back: " + e.problem(), e.fix());
  }
  return out;
}

}  // namespace gapwise
