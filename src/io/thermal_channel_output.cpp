#include "io/thermal_channel_output.hpp"

#include <cmath>

#include <fmt/format.h>

#include "io/bath_attributes.hpp"
#include "io/infinite_tts.hpp"
#include "io/text_table.hpp"

namespace gapwise {

namespace {
std::string ranges_below_theta(const ThermalChannel& tc) {
  // The crossings split the s range; the gap is below theta where the grid says so.
  if (tc.grid_s.empty()) return "-";
  std::vector<double> edges{tc.grid_s.front()};
  for (double s : tc.theta_crossings_s) edges.push_back(s);
  edges.push_back(tc.grid_s.back());
  std::string out;
  for (std::size_t k = 0; k + 1 < edges.size(); ++k) {
    const double mid = 0.5 * (edges[k] + edges[k + 1]);
    // the grid point nearest the middle of the stretch decides
    std::size_t best = 0;
    for (std::size_t q = 0; q < tc.grid_s.size(); ++q)
      if (std::abs(tc.grid_s[q] - mid) < std::abs(tc.grid_s[best] - mid)) best = q;
    if (tc.grid_gap_ghz[best] < tc.theta_ghz)
      out += fmt::format("{}[{:.4f}, {:.4f}]", out.empty() ? "" : ", ", edges[k], edges[k + 1]);
  }
  return out.empty() ? "nowhere on the path" : "for s in " + out;
}

std::string verdict(const ThermalChannel& tc, const ThermalRun& r, double p_closed) {
  const double cost = p_closed - r.open.ground_probability;
  std::string v = fmt::format("at {:.5g} ns the bath {} p by {:.3g} ({:.6f} closed, {:.6f} with the bath). ", r.duration_ns,
                              cost >= 0 ? "lowers" : "raises", std::abs(cost), p_closed, r.open.ground_probability);
  if (r.total_relaxations < 1)
    return v + fmt::format("Fewer than one relaxation over the whole anneal (N = {:.3g}): the bath hardly acts; "
                           "the loss is the closed system's.", r.total_relaxations);
  if (r.fall > 0)
    v += fmt::format("Population leaves the ground group most between s = {:.4f} and {:.4f} ({:.3g}{})", r.fall_s_from,
                     r.fall_s_to, r.fall,
                     r.freeze_s && r.fall_s_from >= *r.freeze_s ? ", after the freeze-out point: not relaxed back" : "");
  if (r.rise > 0)
    v += fmt::format(", and returns most between s = {:.4f} and {:.4f} ({:.3g})", r.rise_s_from, r.rise_s_to, r.rise);
  v += ". ";
  if (r.freeze_s) {
    v += fmt::format("Relaxation freezes out at s = {:.4f}", *r.freeze_s);
    const double last_cross = tc.theta_crossings_s.empty() ? NAN : tc.theta_crossings_s.back();
    if (std::isfinite(last_cross)) {
      if (*r.freeze_s < last_cross)
        v += fmt::format(", before the gap rises above theta (s = {:.4f}): the thermal population there is kept", last_cross);
      else
        v += fmt::format(", after the gap rises above theta (s = {:.4f}): between the two the bath relaxes "
                         "population back (a pause there lengthens it)", last_cross);
    }
    v += ".";
  }
  return v;
}
}  // namespace

std::string thermal_channel_text(const ThermalChannel& tc, const OhmicBath& bath, const std::vector<double>& closed_p,
                                 double closed_gap_ghz, double closed_gap_s) {
  std::string out =
      "\nthermal channel (adiabatic master equation, sigma^z coupling on every qubit, Lamb shift neglected)\n";
  out += fmt::format("bath          {}{}\n", bath.source.empty() ? "" : bath.source + ": ", bath.summary());
  out += fmt::format("gap           E_g - E_0 in the full space (g = {}: the bath's sigma^z couples the spin-flip sectors)\n",
                     tc.ground_levels);
  out += fmt::format("gap < theta   {}", ranges_below_theta(tc));
  out += fmt::format("; smallest gap/theta on the grid {:.3g} at s = {:.4f}\n", tc.min_gap_over_theta, tc.min_gap_s);
  if (std::isfinite(closed_gap_ghz) && tc.theta_ghz > 0)
    out += fmt::format("              (the closed diagnosis' minimum gap {:.6g} GHz at s* = {:.4f} is {:.3g} theta)\n",
                       closed_gap_ghz, closed_gap_s, closed_gap_ghz / tc.theta_ghz);
  out += "freeze-out    where N(t) = integral from t to t_f of Gamma dt falls to 1 (Gamma: golden-rule rate\n"
         "              gamma(w)(1 + e^{-beta w}) |<a|sigma^z_i|b>|^2 between the ground group and the level above)\n";
  TextTable t({"t_f_ns", "p_closed", "p_bath", "relaxations", "freeze_s", "freeze_t_ns", "fall_at_s", "fall",
               "return_at_s", "return", "method"});
  for (std::size_t k = 0; k < tc.runs.size(); ++k) {
    const ThermalRun& r = tc.runs[k];
    t.add({fmt::format("{:.5g}", r.duration_ns), fmt::format("{:.6f}", closed_p[k]),
           fmt::format("{:.6f}", r.open.ground_probability), fmt::format("{:.3g}", r.total_relaxations),
           r.freeze_s ? fmt::format("{:.4f}", *r.freeze_s) : "none", r.freeze_t_ns ? fmt::format("{:.5g}", *r.freeze_t_ns) : "-",
           r.fall > 0 ? fmt::format("{:.3f}-{:.3f}", r.fall_s_from, r.fall_s_to) : "-", fmt::format("{:.3g}", r.fall),
           r.rise > 0 ? fmt::format("{:.3f}-{:.3f}", r.rise_s_from, r.rise_s_to) : "-", fmt::format("{:.3g}", r.rise),
           r.open.propagator + (r.open.levels > 0 ? fmt::format(" K={}", r.open.levels) : "")});
  }
  out += t.render();
  for (std::size_t k = 0; k < tc.runs.size(); ++k) {
    const ThermalRun& r = tc.runs[k];
    out += "  " + verdict(tc, r, closed_p[k]) + "\n";
    out += fmt::format("    density matrix: trace error {:.1e}, smallest eigenvalue {:.1e}, {:.2f} s{}\n",
                       r.open.stats.max_trace_deviation, r.open.min_eigenvalue, r.open.wall_seconds,
                       r.track_note.empty() ? "" : "; " + r.track_note);
  }
  return out;
}

toml::table thermal_channel_json(const ThermalChannel& tc, const OhmicBath& bath, const std::vector<double>& closed_p) {
  toml::table j;
  put(j, "bath_file", bath.source);
  put(j, "temperature_mk", bath.temperature_mk);
  put(j, "theta_ghz", tc.theta_ghz);
  put(j, "coupling", bath.coupling);
  put(j, "cutoff_ghz", bath.cutoff_ghz);
  put(j, "ground_levels", static_cast<long long>(tc.ground_levels));
  toml::array cross;
  for (double s : tc.theta_crossings_s) cross.push_back(s);
  j.insert_or_assign("gap_theta_crossings_s", std::move(cross));
  if (std::isfinite(tc.min_gap_over_theta)) put(j, "min_gap_over_theta", tc.min_gap_over_theta);
  put(j, "min_gap_s", tc.min_gap_s);
  toml::array runs;
  for (std::size_t k = 0; k < tc.runs.size(); ++k) {
    const ThermalRun& r = tc.runs[k];
    toml::table e;
    put(e, "duration_ns", r.duration_ns);
    put(e, "closed_ground_probability", closed_p[k]);
    put(e, "ground_probability", r.open.ground_probability);
    put(e, "total_relaxations", r.total_relaxations);
    if (r.freeze_s) {
      put(e, "freeze_out_s", *r.freeze_s);
      put(e, "freeze_out_t_ns", *r.freeze_t_ns);
    }
    put(e, "largest_fall", r.fall);
    put(e, "largest_fall_s_from", r.fall_s_from);
    put(e, "largest_fall_s_to", r.fall_s_to);
    put(e, "largest_return", r.rise);
    put(e, "largest_return_s_from", r.rise_s_from);
    put(e, "largest_return_s_to", r.rise_s_to);
    put(e, "lowest_group_population", r.lowest_group_population);
    put(e, "lowest_group_population_s", r.lowest_at_s);
    put(e, "propagator", r.open.propagator);
    put(e, "levels", static_cast<long long>(r.open.levels));
    put(e, "max_trace_deviation", r.open.stats.max_trace_deviation);
    put(e, "min_eigenvalue", r.open.min_eigenvalue);
    put(e, "wall_seconds", r.open.wall_seconds);
    put(e, "verdict", verdict(tc, r, closed_p[k]));
    runs.push_back(std::move(e));
  }
  j.insert_or_assign("runs", std::move(runs));
  return j;
}

void write_thermal_channel_hdf5(Hdf5Output& h5, const ThermalChannel& tc, const OhmicBath& bath,
                                const std::vector<double>& closed_p) {
  const std::string root = "/thermal";
  h5.group(root);
  write_bath_attributes(h5, root, bath);
  h5.attribute(root, "ground_levels", static_cast<long long>(tc.ground_levels));
  h5.attribute(root, "gap_definition", std::string("E_g - E_0, full space"));
  h5.attribute(root, "freeze_out_definition",
               std::string("last t with integral from t to t_f of Gamma dt = 1; Gamma = golden-rule rate "
                           "gamma(w)(1 + exp(-beta w)) |<a|sigma^z_i|b>|^2 between the ground group and E_g"));
  h5.write(root + "/grid_s", tc.grid_s, "1");
  h5.write(root + "/grid_gap", tc.grid_gap_ghz, not_applicable("GHz", "no level above the ground group"));
  h5.write(root + "/grid_relaxation_rate", tc.grid_rate_per_ns, "ns^-1");
  h5.write(root + "/gap_theta_crossings_s", tc.theta_crossings_s, "1");
  std::vector<double> dur, freeze_s, freeze_t, total, pb;
  for (const auto& r : tc.runs) {
    dur.push_back(r.duration_ns);
    freeze_s.push_back(r.freeze_s.value_or(NAN));
    freeze_t.push_back(r.freeze_t_ns.value_or(NAN));
    total.push_back(r.total_relaxations);
    pb.push_back(r.open.ground_probability);
  }
  const std::string never = "fewer than one relaxation over the whole anneal (no freeze-out point)";
  h5.write(root + "/durations", dur, "ns");
  h5.write(root + "/closed_ground_probability", closed_p, "1");
  h5.write(root + "/ground_probability", pb, "1");
  h5.write(root + "/total_relaxations", total, "1");
  h5.write(root + "/freeze_out_s", freeze_s, not_applicable("1", never));
  h5.write(root + "/freeze_out_t", freeze_t, not_applicable("ns", never));
  for (std::size_t k = 0; k < tc.runs.size(); ++k) {
    const ThermalRun& r = tc.runs[k];
    const std::string g = fmt::format("{}/duration_{}", root, k);
    std::vector<double> t, s, gap, rate, n, grp, e, pop;
    const std::size_t nl = r.track.empty() ? 0 : r.track.front().populations.size();
    for (const auto& p : r.track) {
      t.push_back(p.t_ns);
      s.push_back(p.s);
      gap.push_back(p.levels.gap_ghz);
      rate.push_back(p.levels.relaxation_rate_per_ns);
      n.push_back(p.remaining_relaxations);
      grp.push_back(p.group_population);
      for (std::size_t l = 0; l < nl; ++l) {
        e.push_back(p.levels.energies_ghz[l]);
        pop.push_back(p.populations[l]);
      }
    }
    h5.write(g + "/t", t, "ns");
    h5.write(g + "/s", s, "1");
    h5.write(g + "/gap", gap, not_applicable("GHz", "no level above the ground group"));
    h5.write(g + "/relaxation_rate", rate, "ns^-1");
    h5.write(g + "/remaining_relaxations", n, "1");
    h5.write(g + "/ground_group_population", grp, "1");
    const std::vector<std::string> axes{g + "/t", h5.level_axis(g, nl)};
    h5.write_matrix(g + "/level_energy", e, t.size(), nl, "GHz", axes);
    h5.write_matrix(g + "/level_population", pop, t.size(), nl, "1", axes);
    h5.attribute(g, "duration_ns", r.duration_ns);
    h5.attribute(g, "ground_probability", r.open.ground_probability);
    h5.attribute(g, "closed_ground_probability", closed_p[k]);
    h5.attribute(g, "propagator", r.open.propagator);
    h5.attribute(g, "levels", static_cast<long long>(r.open.levels));
    h5.attribute(g, "max_trace_deviation", r.open.stats.max_trace_deviation);
    h5.attribute(g, "min_eigenvalue", r.open.min_eigenvalue);
    h5.attribute(g, "total_relaxations", r.total_relaxations);
    h5.attribute_allowing_inf_nan(g, "freeze_out_s", r.freeze_s.value_or(NAN));
  }
}

}  // namespace gapwise
