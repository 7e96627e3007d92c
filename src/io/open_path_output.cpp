#include "io/open_path_output.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "io/bath_attributes.hpp"
#include "io/infinite_tts.hpp"

namespace gapwise {

namespace {
std::string run_phrase(const OpenPathComparison& r, std::size_t k, bool open) {
  if (k >= r.runs.size()) return "none (p = 0 everywhere)";
  const std::size_t i = k / r.durations_ns.size();
  const OpenPathRun& x = r.runs[k];
  return fmt::format("{} at {:.5g} ns (p = {:.6f}, TTS = {} ns)", r.names[i], x.duration_ns,
                     open ? x.open.ground_probability : x.closed_probability,
                     tts_text(open ? x.open_tts.tts_ns : x.closed_tts.tts_ns));
}
}  // namespace

std::string open_path_text(const OpenPathComparison& r, const OhmicBath& bath) {
  std::string out = "\nwith the bath (adiabatic master equation, sigma^z coupling on every qubit, Lamb shift neglected)\n";
  out += fmt::format("bath      {}{}\n", bath.source.empty() ? "" : bath.source + ": ", bath.summary());
  for (std::size_t j = 0; j < r.durations_ns.size(); ++j) {
    const std::size_t bc = r.best_closed[j], bo = r.best_open[j];
    out += fmt::format("best at {:.5g} ns: closed {} (p = {:.6f}); with the bath {} (p = {:.6f}){}\n", r.durations_ns[j],
                       r.names[bc], r.at(bc, j).closed_probability, r.names[bo], r.at(bo, j).open.ground_probability,
                       bc == bo ? "" : "  <- the bath changes the best path");
  }
  out += "smallest TTS over all paths and durations: closed " + run_phrase(r, r.best_tts_closed, false) +
         ";\n                                            with the bath " + run_phrase(r, r.best_tts_open, true) + "\n";
  double trace = 0, min_eig = INFINITY, wall = 0;
  std::string methods;
  for (const auto& x : r.runs) {
    trace = std::max(trace, x.open.stats.max_trace_deviation);
    min_eig = std::min(min_eig, x.open.min_eigenvalue);
    wall += x.open.wall_seconds;
    if (methods.find(x.open.propagator) == std::string::npos) methods += (methods.empty() ? "" : ", ") + x.open.propagator;
  }
  out += fmt::format("density matrices: largest trace error {:.1e}, smallest eigenvalue {:.1e}; {} ({:.2f} s in all)\n",
                     trace, min_eig, methods, wall);
  return out;
}

toml::table open_path_json(const OpenPathComparison& r, const OhmicBath& bath) {
  toml::table j;
  put(j, "bath_file", bath.source);
  put(j, "temperature_mk", bath.temperature_mk);
  put(j, "theta_ghz", bath.theta_ghz());
  put(j, "coupling", bath.coupling);
  put(j, "cutoff_ghz", bath.cutoff_ghz);
  toml::array runs;
  for (std::size_t i = 0; i < r.names.size(); ++i)
    for (std::size_t d = 0; d < r.durations_ns.size(); ++d) {
      const OpenPathRun& x = r.at(i, d);
      toml::table e;
      put(e, "path", r.names[i]);
      put(e, "duration_ns", x.duration_ns);
      put(e, "closed_ground_probability", x.closed_probability);
      put(e, "ground_probability", x.open.ground_probability);
      put_tts(e, "closed_tts_ns", x.closed_tts.tts_ns);
      put_tts(e, "tts_ns", x.open_tts.tts_ns);
      put(e, "max_trace_deviation", x.open.stats.max_trace_deviation);
      put(e, "min_eigenvalue", x.open.min_eigenvalue);
      put(e, "propagator", x.open.propagator);
      put(e, "levels", static_cast<long long>(x.open.levels));
      put(e, "wall_seconds", x.open.wall_seconds);
      runs.push_back(std::move(e));
    }
  j.insert_or_assign("runs", std::move(runs));
  toml::array best;
  for (std::size_t d = 0; d < r.durations_ns.size(); ++d) {
    toml::table e;
    put(e, "duration_ns", r.durations_ns[d]);
    put(e, "closed", r.names[r.best_closed[d]]);
    put(e, "with_bath", r.names[r.best_open[d]]);
    best.push_back(std::move(e));
  }
  j.insert_or_assign("best_path", std::move(best));
  return j;
}

void write_open_path_hdf5(Hdf5Output& h5, const OpenPathComparison& r, const OhmicBath& bath) {
  const std::string g = "/compare/bath";
  h5.group(g);
  write_bath_attributes(h5, g, bath);
  std::vector<double> p, tts, trace, eig;
  std::vector<std::string> method;
  for (const auto& x : r.runs) {
    p.push_back(x.open.ground_probability);
    tts.push_back(stored_tts(x.open_tts.tts_ns));
    trace.push_back(x.open.stats.max_trace_deviation);
    eig.push_back(x.open.min_eigenvalue);
  }
  const std::size_t ni = r.names.size(), nj = r.durations_ns.size();
  const std::vector<std::string> axes{"/compare/paths", "/compare/durations_ns"};
  h5.write_matrix(g + "/ground_probability", p, ni, nj, "1", axes);
  h5.write_matrix(g + "/tts_ns", tts, ni, nj, tts_meaning("ns"), axes);
  h5.write_matrix(g + "/max_trace_deviation", trace, ni, nj, "1", axes);
  h5.write_matrix(g + "/min_eigenvalue", eig, ni, nj, "1", axes);
  std::vector<std::string> bc, bo;
  for (std::size_t d = 0; d < nj; ++d) {
    bc.push_back(r.names[r.best_closed[d]]);
    bo.push_back(r.names[r.best_open[d]]);
  }
  h5.write_strings(g + "/best_path_closed", bc, "per duration (/compare/durations_ns): the path with the highest p, closed");
  h5.write_strings(g + "/best_path_with_bath", bo, "per duration (/compare/durations_ns): the path with the highest p with the bath");
  h5.attribute(g, "propagator", r.runs.empty() ? std::string("-") : r.runs.front().open.propagator);
}

}  // namespace gapwise
