#include "io/diagnosis_output.hpp"

#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "io/hdf5_output.hpp"
#include "io/infinite_tts.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"

namespace gapwise {

namespace {

std::string finite_or(double x, const char* alt, int digits = 4) {
  return std::isfinite(x) ? fmt_num(x, digits) : std::string(alt);
}

}  // namespace

std::string diagnosis_report_text(const Diagnosis& d, const DiagnosisContext& c) {
  const int n = c.qubits;
  std::string out;
  out += fmt::format("diagnosis of {} along {}\n", terminal_text(c.problem_file), terminal_text(c.schedule_file));
  out += fmt::format("ground manifold  energy {:.10g}, {} state(s); next classical level {:.10g}\n", d.ground.energy,
                     d.ground.degeneracy(), d.ground.first_excited_energy);
  out += fmt::format("minimum gap      {:.6g} +- {:.1g} GHz at s* = {:.6f} +- {:.1g}  ({}; {})\n", d.gap.gap_ghz,
                     d.gap.gap_uncertainty_ghz, d.gap.s_star, d.gap.s_star_uncertainty, d.gap.definition,
                     describe_sector(d.gap.sector));
  out += fmt::format("adiabatic scale  t_ad = {:.4g} ns (max_s |<g|dH/ds|0>| / (2 pi Delta(s)^2))\n",
                     d.gap.adiabatic_time_ns);

  TextTable xs({"#", "kind", "s*", "Delta_min_GHz", "slope_GHz", "window_s", "switch_s", "excited_E", "states"});
  for (std::size_t i = 0; i < d.crossings.size(); ++i) {
    const AvoidedCrossing& x = d.crossings[i];
    std::vector<std::string> row{std::to_string(i + 1), x.at_end_point ? "end gap" : x.perturbative_crossing ? "perturbative" : "avoided", fmt_num(x.minimum.s, 6),
                                 fmt_num(x.minimum.gap_ghz, 5), fmt_num(x.diabatic_slope_ghz, 4),
                                 fmt::format("{:.3f}-{:.3f}{}", x.window_s_before, x.window_s_after, x.broad ? "*" : "")};
    if (x.perturbative_crossing) {
      const PerturbativeCrossing& l = d.overlap.perturbative_crossings[*x.perturbative_crossing];
      row.insert(row.end(), {fmt_num(l.s_switch, 6), fmt_num(l.excited_energy, 6), std::to_string(l.excited_degeneracy)});
    } else {
      row.insert(row.end(), {"", "", ""});
    }
    xs.add(row);
  }
  out += fmt::format("\ngap minima on the path ({})\n", d.crossings.size());
  out += d.crossings.empty() ? std::string("  none\n") : xs.render();
  for (std::size_t i = 0; i < d.crossings.size(); ++i) {
    const AvoidedCrossing& x = d.crossings[i];
    if (x.broad)
      out += fmt::format("  * crossing {}: broad minimum, the gap stays below {:g} x Delta_min over s in [{:.3f}, {:.3f}] "
                         "(more than {:g} of the path): not an isolated crossing; its loss is all that leaves over that "
                         "stretch, and Landau-Zener is only indicative\n",
                         i + 1, d.window_factor, x.window_s_before, x.window_s_after, d.broad_window_fraction);
  }
  bool any_lz = false;
  for (const AvoidedCrossing& x : d.crossings) any_lz = any_lz || std::isfinite(x.landau_zener_duration_ns);
  if (any_lz) {
    TextTable lz({"crossing", "LZ_duration_ns", "simulated_loss_there", "simulated_p", "target_loss", "verdict"});
    for (std::size_t i = 0; i < d.crossings.size(); ++i) {
      const AvoidedCrossing& x = d.crossings[i];
      if (!std::isfinite(x.landau_zener_duration_ns)) continue;
      if (x.check)
        lz.add({std::to_string(i + 1), fmt_num(x.landau_zener_duration_ns, 4), fmt_num(x.check->transferred, 4),
                fmt_num(x.check_ground_probability, 4), fmt::format("{:g}", d.target_loss),
                x.check->transferred <= d.target_loss         ? "meets target"
                : x.check->transferred <= 1.5 * d.target_loss ? "slightly short"
                                                              : "short of target"});
      else
        lz.add({std::to_string(i + 1), fmt_num(x.landau_zener_duration_ns, 4), "-", "-", fmt::format("{:g}", d.target_loss),
                d.check_max_ns > 0 ? fmt::format("not simulated (> {:g} ns)", d.check_max_ns)
                                    : std::string("not simulated (--check-max-ns 0)")});
    }
    out += "Landau-Zener extrapolation (duration for the target loss at each crossing) and one anneal simulated there\n" +
           lz.render();
  }
  if (!d.overlap.perturbative_crossings.empty()) {
    out += "perturbative crossings (ground level leaves an excited classical level for the ground manifold)\n";
    for (const PerturbativeCrossing& l : d.overlap.perturbative_crossings)
      out += fmt::format("  s = {:.6f}: excited level E = {:.6g} ({} states, min {} / mean {:.2f} flips), weight {:.3f} "
                         "before; ground weight {:.3f} after; E_1 - E_0 = {:.4g} GHz there\n",
                         l.s_switch, l.excited_energy, l.excited_degeneracy, l.hamming_to_ground, l.mean_hamming_before,
                         l.excited_weight_before, l.ground_weight_after, l.gap_at_switch_ghz);
  }

  for (std::size_t r = 0; r < d.runs.size(); ++r) {
    const DurationDiagnosis& run = d.runs[r];
    out += fmt::format("\n== t_f = {:g} ns: p = {:.6f} (ground manifold), lost {:.6f}\n", run.duration_ns,
                       run.anneal.ground_probability, 1 - run.anneal.ground_probability);
    const double lost = 1 - run.anneal.ground_probability;
    // The headline compares like with like: a channel of the anneal against the
    // 1 - p it explains; control errors as the further loss they add to it.
    const Channel* own = nullptr;
    for (const Channel& k : run.channels)
      if (k.kind != ChannelKind::ControlErrors && k.kind != ChannelKind::UnfairSampling) {
        own = &k;
        break;
      }
    auto own_line = [&](const Channel& k) {
      return fmt::format("{} (loss {:.4f} of the {:.4f} lost)", channel_kind_name(k.kind), k.loss, lost);
    };
    if (!run.channels.empty() && run.channels.front().kind == ChannelKind::ControlErrors &&
        run.channels.front().loss >= 1e-3) {
      const double further = run.channels.front().loss;
      out += fmt::format("limited by: control errors (they lower the mean p from {:.4f} to {:.4f}: a further {:.4f} "
                         "lost, {:.4f} in all with them; {})\n",
                         run.anneal.ground_probability, run.anneal.ground_probability - further, further,
                         lost + further, control_sigma_phrase(d));
      out += own && own->loss >= 1e-3 ? fmt::format("without control errors: {}\n", own_line(*own))
                                      : fmt::format("without control errors no channel costs 1e-3 or more (lost {:.2g} "
                                                    "in all)\n", lost);
    } else if (!run.channels.empty() && run.channels.front().loss >= 1e-3) {
      out += fmt::format("limited by: {}\n", own_line(run.channels.front()));
    } else {
      out += fmt::format("no channel costs 1e-3 or more (lost {:.2g} in all)\n", lost);
    }
    for (std::size_t k = 0; k < run.channels.size(); ++k) {
      const Channel& ch = run.channels[k];
      const bool gain = ch.regained >= 5e-5;  // smaller remainders print as loss 0.0000
      out += fmt::format("{:>2}. {:<21} {} {:>7.4f}  {}\n", k + 1, channel_kind_name(ch.kind), gain ? "gain" : "loss",
                         gain ? ch.regained : ch.loss, ch.verdict);
    }
    if (!d.crossings.empty()) {
      // Crossings and elsewhere add up to 1 - p (the control-error loss is on top of it).
      std::string sum;
      double total = 0;
      for (const Channel& ch : run.channels) {
        if (ch.kind == ChannelKind::ControlErrors || ch.kind == ChannelKind::UnfairSampling) continue;
        const double v = ch.loss - ch.regained;
        total += v;
        if (std::abs(v) < 5e-5) continue;  // shown as 0.0000 anyway
        sum += fmt::format("{}{:.4f} ({})", sum.empty() ? (v < 0 ? "-" : "") : (v < 0 ? " - " : " + "), std::abs(v),
                           channel_kind_name(ch.kind));
      }
      if (sum.empty()) sum = "0";
      out += fmt::format("    the losses add up: {} = {:.4f} = 1 - p\n", sum, total);
    }
    if (!d.crossings.empty()) {
      TextTable ps({"crossing", "s_before", "s_after", "pop_before", "pop_after", "transferred", "LZ_predicted",
                    "sweep_GHz/ns"});
      for (std::size_t i = 0; i < d.crossings.size(); ++i) {
        const CrossingPassage& p = d.crossings[i].passages[r];
        ps.add({std::to_string(i + 1), fmt_num(p.s_before, 5), fmt_num(p.s_after, 5), fmt_num(p.population_before, 6),
                fmt_num(p.population_after, 6), fmt_num(p.transferred, 5), finite_or(p.landau_zener_loss, "-", 5),
                fmt_num(p.sweep_rate_ghz_per_ns, 4)});
      }
      out += "populations of the levels that end in the ground manifold, around each crossing\n" + ps.render();
    }
    if (!run.outcome.sink_levels.empty()) {
      TextTable sl({"energy", "states", "probability", "min_flips"});
      for (const SinkLevel& s : run.outcome.sink_levels)
        sl.add({fmt_num(s.energy, 8), std::to_string(s.states), fmt_num(s.probability, 5),
                std::to_string(s.min_hamming_to_ground)});
      out += "where the lost probability goes: excited classical levels\n" + sl.render();
      TextTable ss({fmt::format("bits q0..q{}", n - 1), "energy", "probability", "flips_to_ground"});
      for (const SinkState& s : run.outcome.sink_states)
        ss.add({bits_string(s.state, n), fmt_num(s.energy, 8), fmt_num(s.probability, 5),
                std::to_string(s.hamming_to_ground)});
      out += "  ... and the states that collect most\n" + ss.render();
    }
    if (d.ground.degeneracy() >= 2) {
      TextTable gs({fmt::format("ground state q0..q{}", n - 1), "probability", "share"});
      for (const GroundStateShare& g : run.outcome.ground)
        gs.add({bits_string(g.state, n), fmt_num(g.probability, 6), fmt_num(g.share, 4)});
      out += fmt::format("ground-state shares (fair: {:.4f} each; max/min {}, distance from fair {:.4f})\n",
                         1.0 / static_cast<double>(d.ground.degeneracy()),
                         finite_or(run.outcome.balance.max_over_min, "infinite"), run.outcome.balance.distance_from_fair) +
             gs.render();
    }
  }

  if (d.control) {
    const ControlEnsemble& e = *d.control;
    out += fmt::format("\ncontrol errors: {} samples, seed {}, sigma_h = {:g}, sigma_J = {:g} ({})\n", e.samples.size(),
                       e.options.seed, e.options.model.sigma_h, e.options.model.sigma_j,
                       e.options.model.relative ? "relative to each term" : "absolute, problem units");
    if (!d.control_sigma_h_given || !d.control_sigma_j_given)
      out += fmt::format("  ({})\n", control_sigma_phrase(d));
    out += fmt::format("ground state changed in {:.4f} +- {:.4f} of the samples\n", e.ground_change_rate,
                       e.ground_change_stderr);
    TextTable q({"quantity", "q05", "q25", "median", "q75", "q95", "unperturbed"});
    auto add = [&](const std::string& name, const std::vector<double>& v, double ref) {
      q.add({name, finite_or(quantile(v, 0.05), "-", 5), finite_or(quantile(v, 0.25), "-", 5),
             finite_or(quantile(v, 0.5), "-", 5), finite_or(quantile(v, 0.75), "-", 5),
             finite_or(quantile(v, 0.95), "-", 5), fmt_num(ref, 5)});
    };
    add("Delta_min_GHz", e.column(&ControlSample::delta_min_ghz), d.gap.gap_ghz);
    add("s*", e.column(&ControlSample::s_star), d.gap.s_star);
    add("classical_margin", e.column(&ControlSample::classical_margin), d.ground.first_excited_energy - d.ground.energy);
    for (std::size_t r = 0; r < d.runs.size(); ++r)
      add(fmt::format("p({:g} ns)", d.runs[r].duration_ns), e.p_column(r), d.runs[r].anneal.ground_probability);
    out += q.render();
  }
  return out;
}

toml::table diagnosis_json(const Diagnosis& d, const DiagnosisContext& c) {
  const int n = c.qubits;
  toml::table j;
  put(j, "problem_file", c.problem_file);
  put(j, "schedule_file", c.schedule_file);
  put(j, "ground_energy", d.ground.energy);
  put(j, "ground_degeneracy", static_cast<long long>(d.ground.degeneracy()));
  put(j, "gap_ghz", d.gap.gap_ghz);
  put(j, "s_star", d.gap.s_star);
  put(j, "gap_definition", d.gap.definition);
  put(j, "sector", sector_name(d.gap.sector));
  put(j, "target_loss", d.target_loss);
  toml::array xs;
  for (const AvoidedCrossing& x : d.crossings) {
    toml::table t;
    put(t, "s_star", x.minimum.s);
    put(t, "delta_min_ghz", x.minimum.gap_ghz);
    put(t, "diabatic_slope_ghz", x.diabatic_slope_ghz);
    put(t, "window_s_before", x.window_s_before);
    put(t, "window_s_after", x.window_s_after);
    put(t, "perturbative", x.perturbative_crossing.has_value());
    put(t, "end_gap", x.at_end_point);
    put(t, "broad", x.broad);
    if (std::isfinite(x.landau_zener_duration_ns)) put(t, "landau_zener_duration_ns", x.landau_zener_duration_ns);
    if (x.check) {
      toml::table ct;
      put(ct, "duration_ns", x.check->duration_ns);
      put(ct, "ground_probability", x.check_ground_probability);
      put(ct, "transferred", x.check->transferred);
      put(ct, "meets_target", x.check->transferred <= d.target_loss);
      t.insert_or_assign("check", std::move(ct));
    }
    toml::array ps;
    for (const CrossingPassage& p : x.passages) {
      toml::table pt;
      put(pt, "duration_ns", p.duration_ns);
      put(pt, "population_before", p.population_before);
      put(pt, "population_after", p.population_after);
      put(pt, "transferred", p.transferred);
      if (std::isfinite(p.landau_zener_loss)) put(pt, "landau_zener_loss", p.landau_zener_loss);
      put(pt, "sweep_rate_ghz_per_ns", p.sweep_rate_ghz_per_ns);
      ps.push_back(std::move(pt));
    }
    t.insert_or_assign("passages", std::move(ps));
    xs.push_back(std::move(t));
  }
  j.insert_or_assign("crossings", std::move(xs));
  toml::array late;
  for (const PerturbativeCrossing& l : d.overlap.perturbative_crossings) {
    toml::table t;
    put(t, "s_switch", l.s_switch);
    put(t, "excited_energy", l.excited_energy);
    put(t, "excited_degeneracy", static_cast<long long>(l.excited_degeneracy));
    put(t, "min_flips", static_cast<long long>(l.hamming_to_ground));
    put(t, "mean_flips", l.mean_hamming_before);
    put(t, "gap_at_switch_ghz", l.gap_at_switch_ghz);
    late.push_back(std::move(t));
  }
  j.insert_or_assign("perturbative_crossings", std::move(late));
  toml::array runs;
  for (const DurationDiagnosis& run : d.runs) {
    toml::table t;
    put(t, "duration_ns", run.duration_ns);
    put(t, "ground_probability", run.anneal.ground_probability);
    put(t, "unattributed_loss", run.unattributed_loss);
    toml::array ch;
    for (const Channel& k : run.channels) {
      toml::table ct;
      put(ct, "channel", std::string(channel_kind_name(k.kind)));
      put(ct, "loss", k.loss);
      put(ct, "regained", k.regained);
      put(ct, "verdict", k.verdict);
      ch.push_back(std::move(ct));
    }
    t.insert_or_assign("channels", std::move(ch));
    toml::array gs;
    for (const GroundStateShare& g : run.outcome.ground) {
      toml::table gt;
      put(gt, "bits", bits_string(g.state, n));
      put(gt, "probability", g.probability);
      put(gt, "share", g.share);
      gs.push_back(std::move(gt));
    }
    t.insert_or_assign("ground_states", std::move(gs));
    if (std::isfinite(run.outcome.balance.max_over_min)) put(t, "imbalance_max_over_min", run.outcome.balance.max_over_min);
    put(t, "imbalance_distance_from_fair", run.outcome.balance.distance_from_fair);
    toml::array sinks;
    for (const SinkState& s : run.outcome.sink_states) {
      toml::table st;
      put(st, "bits", bits_string(s.state, n));
      put(st, "energy", s.energy);
      put(st, "probability", s.probability);
      put(st, "flips_to_ground", static_cast<long long>(s.hamming_to_ground));
      sinks.push_back(std::move(st));
    }
    t.insert_or_assign("sink_states", std::move(sinks));
    runs.push_back(std::move(t));
  }
  j.insert_or_assign("runs", std::move(runs));
  if (d.control) {
    const ControlEnsemble& e = *d.control;
    toml::table t;
    put(t, "samples", static_cast<long long>(e.samples.size()));
    put(t, "seed", static_cast<long long>(e.options.seed));
    put(t, "sigma_h", e.options.model.sigma_h);
    put(t, "sigma_j", e.options.model.sigma_j);
    put(t, "relative", e.options.model.relative);
    put(t, "sigmas_are_defaults", !d.control_sigma_h_given || !d.control_sigma_j_given);
    put(t, "ground_change_rate", e.ground_change_rate);
    put(t, "ground_change_stderr", e.ground_change_stderr);
    auto quant = [&](const std::vector<double>& v) {
      toml::table q;
      for (auto [name, p] : {std::pair{"q05", 0.05}, {"q25", 0.25}, {"median", 0.5}, {"q75", 0.75}, {"q95", 0.95}}) {
        const double x = quantile(v, p);
        if (std::isfinite(x)) put(q, name, x);
      }
      return q;
    };
    t.insert_or_assign("delta_min_ghz", quant(e.column(&ControlSample::delta_min_ghz)));
    t.insert_or_assign("s_star", quant(e.column(&ControlSample::s_star)));
    toml::array ps;
    for (std::size_t r = 0; r < d.runs.size(); ++r) ps.push_back(quant(e.p_column(r)));
    t.insert_or_assign("ground_probability", std::move(ps));
    j.insert_or_assign("control_errors", std::move(t));
  }
  return j;
}

void write_diagnosis_hdf5(const Diagnosis& d, const DiagnosisContext& c, const std::string& path,
                          const std::function<void(Hdf5Output&)>& extra) {
  Hdf5Output h5(path, {"gapwise-diagnosis", 1});
  write_provenance(h5, c.command_line, {c.problem_file, c.schedule_file});
  const std::string root = "/diagnosis";
  h5.group(root);
  h5.attribute(root, "ground_energy", d.ground.energy);
  h5.attribute(root, "gap_ghz", d.gap.gap_ghz);
  h5.attribute(root, "s_star", d.gap.s_star);
  h5.attribute(root, "gap_definition", d.gap.definition);
  h5.attribute(root, "sector", sector_name(d.gap.sector));
  h5.write(root + "/durations", d.durations_ns, "ns");
  h5.write(root + "/ground_states", std::vector<long long>(d.ground.states.begin(), d.ground.states.end()),
           DataMeaning("1").described("basis index (bit i = qubit i)"));
  {
    std::vector<double> s, gap;
    for (const SpectrumPoint& p : d.gap.curve) {
      s.push_back(p.s);
      gap.push_back(p.gap_ghz);
    }
    h5.write(root + "/spectrum/s", s, "1");
    h5.write(root + "/spectrum/gap", gap, "GHz");
  }
  {
    const OverlapColumns o = overlap_columns(d);
    const std::size_t k = o.levels;
    h5.write(root + "/overlap/s", o.s, "1");
    const std::vector<std::string> axes{root + "/overlap/s", h5.level_axis(root + "/overlap", k)};
    const std::string untracked = "level not tracked at this s";
    h5.write_matrix(root + "/overlap/ground_weight", o.ground_weight, o.s.size(), k, not_applicable("1", untracked), axes);
    h5.write_matrix(root + "/overlap/energy", o.energy, o.s.size(), k, not_applicable("GHz", untracked), axes);
    h5.write_matrix(root + "/overlap/dominant_excited_weight", o.dominant_excited_weight, o.s.size(), k,
                    not_applicable("1", untracked), axes);
    h5.write(root + "/overlap/perturbative_crossing_s", o.perturbative_crossing_s, "1");
  }
  {
    const std::size_t m = d.crossings.size(), r = d.runs.size();
    const CrossingColumns x = crossing_columns(d);
    h5.write(root + "/crossings/s_star", x.s_star, "1");
    h5.write(root + "/crossings/delta_min", x.delta_min, "GHz");
    h5.write(root + "/crossings/diabatic_slope", x.diabatic_slope, "GHz");
    h5.write(root + "/crossings/perturbative_crossing_index", x.perturbative_crossing_index,
             DataMeaning("1").described("index into overlap/perturbative_crossing_s, -1 for none"));
    h5.write(root + "/crossings/crossing", x.crossing, DataMeaning("1").described("crossing index (rows of the crossing matrices)"));
    const std::vector<std::string> axes{root + "/crossings/crossing", root + "/durations"};
    h5.write_matrix(root + "/crossings/population_before", x.population_before, m, r, "1", axes);
    h5.write_matrix(root + "/crossings/population_after", x.population_after, m, r, "1", axes);
    h5.write_matrix(root + "/crossings/transferred", x.transferred, m, r, "1", axes);
    h5.write_matrix(root + "/crossings/landau_zener_loss", x.landau_zener_loss, m, r,
                    not_applicable("1", "end gap (no Landau-Zener number)"), axes);
    h5.write(root + "/crossings/end_gap", x.end_gap,
             DataMeaning("1").flagged({0, 1}, "interior end_gap").described("1: smallest gap at an end of the path"));
    h5.write(root + "/crossings/broad", x.broad,
             DataMeaning("1").flagged({0, 1}, "isolated broad").described("1: window narrowed, not an isolated crossing"));
    h5.write(root + "/crossings/landau_zener_duration", x.landau_zener_duration, not_applicable("ns", "end gap (no Landau-Zener number)"));
    h5.write(root + "/crossings/check_run", x.check_run,
             DataMeaning("1").flagged({0, 1}, "not_run run").described("1: an anneal was simulated at landau_zener_duration"));
    h5.write(root + "/crossings/check_ground_probability", x.check_ground_probability,
             not_applicable("1", "no anneal was simulated (check_run 0)").described("p simulated at landau_zener_duration"));
    h5.write(root + "/crossings/check_transferred", x.check_transferred,
             DataMeaning("1").described("loss at this crossing in that run; 0 when check_run is 0"));
  }
  for (std::size_t r = 0; r < d.runs.size(); ++r) {
    const DurationDiagnosis& run = d.runs[r];
    const std::string g = fmt::format("{}/runs/{}", root, r);
    h5.group(g);
    h5.attribute(g, "duration_ns", run.duration_ns);
    h5.attribute(g, "ground_probability", run.anneal.ground_probability);
    h5.attribute(g, "unattributed_loss", run.unattributed_loss);
    h5.write(g + "/final_probabilities", probabilities(run.anneal.final_state), "1");
    std::vector<std::string> kinds, verdicts;
    std::vector<double> losses;
    for (const Channel& k : run.channels) {
      kinds.push_back(channel_kind_name(k.kind));
      verdicts.push_back(k.verdict);
      losses.push_back(k.loss);
    }
    h5.write_strings(g + "/channel_kind", kinds, "loss channel, ranked");
    h5.write_strings(g + "/channel_verdict", verdicts, "one-line verdict per channel");
    h5.write(g + "/channel_loss", losses, "1");
    std::vector<double> regained;
    for (const Channel& k : run.channels) regained.push_back(k.regained);
    h5.write(g + "/channel_regained", regained, "1");
  }
  if (d.control) {
    const ControlEnsemble& e = *d.control;
    const std::string g = root + "/control";
    h5.group(g);
    h5.attribute(g, "seed", static_cast<long long>(e.options.seed));
    h5.attribute(g, "sigma_h", e.options.model.sigma_h);
    h5.attribute(g, "sigma_j", e.options.model.sigma_j);
    h5.attribute(g, "relative", static_cast<long long>(e.options.model.relative));
    h5.attribute(g, "ground_change_rate", e.ground_change_rate);
    h5.attribute(g, "sigmas_are_defaults", static_cast<long long>(!d.control_sigma_h_given || !d.control_sigma_j_given));
    std::vector<long long> idx, changed;
    std::vector<double> p;
    for (const ControlSample& s : e.samples) {
      idx.push_back(static_cast<long long>(s.index));
      changed.push_back(s.ground_changed);
      for (std::size_t r = 0; r < d.runs.size(); ++r)
        p.push_back(r < s.p_intended.size() ? s.p_intended[r] : std::numeric_limits<double>::quiet_NaN());
    }
    h5.write(g + "/sample", idx, DataMeaning("1").described("Monte Carlo sample index"));
    h5.write(g + "/ground_changed", changed, DataMeaning("1").flagged({0, 1}, "kept changed"));
    h5.write(g + "/classical_margin", e.column(&ControlSample::classical_margin),
             DataMeaning("1").described("classical energy margin, in the problem's own units"));
    if (!e.samples.empty() && std::isfinite(e.samples.front().delta_min_ghz)) {
      h5.write(g + "/delta_min", e.column(&ControlSample::delta_min_ghz), "GHz");
      h5.write(g + "/s_star", e.column(&ControlSample::s_star), "1");
    }
    h5.write_matrix(g + "/ground_probability", p, e.samples.size(), d.runs.size(),
                    not_applicable("1", "no run at this duration for this sample"), {g + "/sample", root + "/durations"});
  }
  if (extra) extra(h5);
  h5.commit();
}


OverlapColumns overlap_columns(const Diagnosis& d) {
  constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  OverlapColumns o;
  o.levels = d.overlap.points.empty() ? 0 : d.overlap.points.front().levels.size();
  for (const OverlapPoint& p : d.overlap.points) {
    o.s.push_back(p.s);
    for (std::size_t q = 0; q < o.levels; ++q) {
      const bool has = q < p.levels.size();
      o.ground_weight.push_back(has ? p.levels[q].ground_weight : kNaN);
      o.energy.push_back(has ? p.levels[q].energy_ghz : kNaN);
      o.dominant_excited_weight.push_back(has ? p.levels[q].dominant_excited_weight : kNaN);
    }
  }
  for (const PerturbativeCrossing& l : d.overlap.perturbative_crossings) o.perturbative_crossing_s.push_back(l.s_switch);
  return o;
}

CrossingColumns crossing_columns(const Diagnosis& d) {
  constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  auto finite_or_nan = [](double v) { return std::isfinite(v) ? v : kNaN; };
  CrossingColumns c;
  for (std::size_t i = 0; i < d.crossings.size(); ++i) {
    const AvoidedCrossing& x = d.crossings[i];
    c.crossing.push_back(static_cast<long long>(i));
    c.s_star.push_back(x.minimum.s);
    c.delta_min.push_back(x.minimum.gap_ghz);
    c.diabatic_slope.push_back(x.diabatic_slope_ghz);
    c.perturbative_crossing_index.push_back(x.perturbative_crossing ? static_cast<long long>(*x.perturbative_crossing) : -1);
    for (const CrossingPassage& p : x.passages) {
      c.population_before.push_back(p.population_before);
      c.population_after.push_back(p.population_after);
      c.transferred.push_back(p.transferred);
      c.landau_zener_loss.push_back(finite_or_nan(p.landau_zener_loss));
    }
    c.end_gap.push_back(x.at_end_point);
    c.broad.push_back(x.broad);
    c.check_run.push_back(x.check.has_value());
    c.landau_zener_duration.push_back(finite_or_nan(x.landau_zener_duration_ns));
    c.check_ground_probability.push_back(x.check ? x.check_ground_probability : kNaN);
    c.check_transferred.push_back(x.check ? x.check->transferred : 0.0);
  }
  return c;
}

}  // namespace gapwise
