#include "io/ensemble_report.hpp"

#include <algorithm>
#include <cmath>
#include <iostream>
#include <limits>

#include <fmt/format.h>

#include "dynamics/propagator.hpp"
#include "io/atomic_file.hpp"
#include "io/infinite_tts.hpp"
#include "io/json_summary.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"

namespace gapwise {
namespace {

std::string interval_text(const QuantileEstimate& q, int digits) {
  return fmt::format("{} [{}, {}]", tts_text(q.value, digits), tts_text(q.interval.low, digits),
                     tts_text(q.interval.high, digits));
}

}  // namespace

/// The per-size table every ensemble command prints (and --csv writes).
TextTable ensemble_size_table(const EnsembleResult& r) {
  const auto& qs = r.settings.quantile_levels;
  std::vector<std::string> head = {"qubits", "instances"};
  const int ci = static_cast<int>(std::lround(100 * r.settings.confidence_level));
  for (double q : qs) head.push_back(fmt::format("TTS_ns q{} [{}% CI]", fmt_num(q, 3), ci));
  for (double q : qs) head.push_back(fmt::format("gap_GHz q{}", fmt_num(q, 3)));
  head.push_back("TTS at range edge");
  head.push_back("never solved");
  const bool bath = r.settings.bath.has_value();
  if (bath) {
    for (double q : qs) head.push_back(fmt::format("bath TTS_ns q{} [{}% CI]", fmt_num(q, 3), ci));
    head.push_back("bath TTS at range edge");
    head.push_back("bath never solved");
  }
  TextTable t(head);
  for (const auto& s : r.sizes) {
    std::vector<std::string> row = {std::to_string(s.qubits), std::to_string(s.tts_ns.count)};
    for (const auto& q : s.tts_ns.quantiles) row.push_back(interval_text(q, 4));
    for (const auto& q : s.gap_ghz.quantiles) row.push_back(fmt_num(q.value, 4));
    row.push_back(std::to_string(s.tts_at_range_edge));
    row.push_back(std::to_string(s.never_solved));
    if (bath) {
      for (const auto& q : s.bath_tts_ns.quantiles) row.push_back(interval_text(q, 4));
      row.push_back(std::to_string(s.bath_tts_at_range_edge));
      row.push_back(std::to_string(s.bath_never_solved));
    }
    t.add(row);
  }
  return t;
}

void print_ensemble_summary(const EnsembleResult& r, const std::string& out, const std::string& csv) {
  std::cout << fmt::format("instance set  {} ({} instances, fingerprint {}){}\n", r.set_source, r.set_size, r.set_fingerprint,
                           r.shard.count > 1 ? fmt::format(", shard {} holds {}", r.shard.text(), r.instances.size()) : "");
  std::cout << fmt::format("durations     {} from {} to {} ns; TTS target p* = {}; propagator {} (tolerance {:.0e})\n",
                           r.settings.durations_ns.size(), fmt_num(r.settings.durations_ns.front(), 6),
                           fmt_num(r.settings.durations_ns.back(), 6), r.settings.target_probability,
                           r.settings.simulation.propagator, r.settings.simulation.propagation.tolerance);
  std::vector<std::string> used;
  for (const auto& o : r.instances) used.insert(used.end(), o.propagator_used.begin(), o.propagator_used.end());
  std::cout << fmt::format("propagators   {} (anneals: instances x durations)\n", propagator_tally(used));
  if (r.settings.bath) {
    const OhmicBath& b = *r.settings.bath;
    double trace = 0, eig = std::numeric_limits<double>::infinity();
    for (const auto& o : r.instances) {
      trace = std::max(trace, o.bath_max_trace_error);
      eig = std::min(eig, o.bath_min_eigenvalue);
    }
    std::cout << fmt::format("bath          {}{}; adiabatic master equation ({}{}), every anneal also run with it\n",
                             b.source.empty() ? "" : b.source + ": ", b.summary(), r.settings.open.method,
                             r.settings.open.levels > 0 ? fmt::format(", K = {} fixed, not checked", r.settings.open.levels)
                                                        : std::string());
    std::cout << fmt::format("density matrix  trace error at most {:.1e}, smallest eigenvalue {:.1e} over all runs\n",
                             trace, eig);
  }
  std::cout << fmt::format("work          {}: {} computed, {} from the journal, {:.1f} s\n", r.distribution, r.computed,
                           r.resumed, r.wall_seconds);
  int planted = 0, planted_ok = 0;
  for (const auto& o : r.instances)
    if (o.planted_check >= 0) { ++planted; planted_ok += o.planted_check; }
  if (planted)
    std::cout << fmt::format("planted       brute-force ground energy equals the planted one for {} of {} instances{}\n",
                             planted_ok, planted, planted_ok == planted ? "" : "  (WARNING)");
  std::cout << fmt::format("\noptimal time to solution and minimum gap per size (bootstrap {} resamples, seed {})\n",
                           r.settings.bootstrap_resamples, r.settings.bootstrap_seed);
  const TextTable t = ensemble_size_table(r);
  std::cout << t.render();
  if (r.settings.bath) {
    // p with the bath beside the closed p, per instance and duration.
    std::vector<std::string> head = {"instance", "qubits"};
    for (double d : r.settings.durations_ns) head.push_back(fmt::format("p closed / bath @ {} ns", fmt_num(d, 4)));
    head.push_back("TTS_ns closed");
    head.push_back("TTS_ns bath");
    TextTable per(head);
    for (const auto& o : r.instances) {
      std::vector<std::string> row = {terminal_text(o.name), std::to_string(o.qubits)};
      for (std::size_t k = 0; k < o.ground_probability.size(); ++k)
        row.push_back(fmt::format("{:.6f} / {:.6f}", o.ground_probability[k], o.bath_ground_probability.at(k)));
      row.push_back(tts_text(o.tts_ns, 4));
      row.push_back(tts_text(o.bath_tts_ns, 4));
      per.add(row);
    }
    std::cout << "\nground-state probability per instance, closed system / with the bath\n" << per.render();
  }
  if (!csv.empty()) write_file_atomically(csv, t.csv());
  if (!out.empty()) std::cout << fmt::format("\nresult written to {}\n", out);
}

void print_ensemble_json(const EnsembleResult& r, const std::string& csv) {
  toml::table j;
  put(j, "instance_set", r.set_source);
  put(j, "set_fingerprint", r.set_fingerprint);
  put(j, "set_size", static_cast<long long>(r.set_size));
  put(j, "instances", static_cast<long long>(r.instances.size()));
  put(j, "shard", r.shard.text());
  put(j, "target", r.settings.target_probability);
  put(j, "propagator", r.settings.simulation.propagator);
  put(j, "tolerance", r.settings.simulation.propagation.tolerance);
  {
    // How many anneals (instances x durations) each propagator ran.
    std::vector<std::string> used;
    for (const auto& o : r.instances) used.insert(used.end(), o.propagator_used.begin(), o.propagator_used.end());
    toml::table counts;
    for (const auto& [name, n] : propagator_counts(used)) put(counts, name, static_cast<long long>(n));
    j.insert_or_assign("propagator_counts", std::move(counts));
  }
  toml::array durations;
  for (double d : r.settings.durations_ns) durations.push_back(d);
  j.insert_or_assign("durations_ns", std::move(durations));
  put(j, "confidence_level", r.settings.confidence_level);
  put(j, "bootstrap_resamples", static_cast<long long>(r.settings.bootstrap_resamples));
  put(j, "bootstrap_seed", static_cast<long long>(r.settings.bootstrap_seed));
  put(j, "computed", static_cast<long long>(r.computed));
  put(j, "resumed", static_cast<long long>(r.resumed));
  long long planted = 0, planted_ok = 0, edge = 0, never = 0;
  for (const auto& o : r.instances)
    if (o.planted_check >= 0) { ++planted; planted_ok += o.planted_check; }
  auto quantiles = [](const SampleSummary& s) {
    toml::array a;
    for (const auto& q : s.quantiles) {
      toml::table e;
      put(e, "q", q.q);
      put(e, "infinite", std::isinf(q.value));  // finite numbers only in JSON: an infinite bound is left out
      if (std::isfinite(q.value)) put(e, "value", q.value);
      if (std::isfinite(q.interval.low)) put(e, "ci_low", q.interval.low);
      if (std::isfinite(q.interval.high)) put(e, "ci_high", q.interval.high);
      a.push_back(std::move(e));
    }
    return a;
  };
  toml::array sizes;
  for (const auto& s : r.sizes) {
    toml::table e;
    put(e, "qubits", static_cast<long long>(s.qubits));
    put(e, "instances", static_cast<long long>(s.tts_ns.count));
    put(e, "tts_at_range_edge", static_cast<long long>(s.tts_at_range_edge));
    put(e, "never_solved", static_cast<long long>(s.never_solved));
    e.insert_or_assign("tts_ns", quantiles(s.tts_ns));
    e.insert_or_assign("gap_ghz", quantiles(s.gap_ghz));
    if (r.settings.bath) {
      e.insert_or_assign("bath_tts_ns", quantiles(s.bath_tts_ns));
      put(e, "bath_tts_at_range_edge", static_cast<long long>(s.bath_tts_at_range_edge));
      put(e, "bath_never_solved", static_cast<long long>(s.bath_never_solved));
    }
    edge += static_cast<long long>(s.tts_at_range_edge);
    never += static_cast<long long>(s.never_solved);
    sizes.push_back(std::move(e));
  }
  put(j, "tts_at_range_edge", edge);
  put(j, "never_solved", never);
  put(j, "planted_instances", planted);
  put(j, "planted_ground_energy_confirmed", planted_ok);
  j.insert_or_assign("sizes", std::move(sizes));
  if (r.settings.bath) {
    const OhmicBath& b = *r.settings.bath;
    toml::table bt;
    put(bt, "file", b.source);
    put(bt, "temperature_mk", b.temperature_mk);
    put(bt, "theta_ghz", b.theta_ghz());
    put(bt, "coupling", b.coupling);
    put(bt, "cutoff_ghz", b.cutoff_ghz);
    put(bt, "method", r.settings.open.method);
    put(bt, "levels", static_cast<long long>(r.settings.open.levels));
    j.insert_or_assign("bath", std::move(bt));
    // Per instance: p closed and with the bath at each duration, and both TTS
    // (an infinite TTS is left out, with `*_tts_infinite` true).
    toml::array per;
    for (const auto& o : r.instances) {
      toml::table e;
      put(e, "name", o.name);
      put(e, "qubits", static_cast<long long>(o.qubits));
      toml::array pc, pb;
      for (double x : o.ground_probability) pc.push_back(x);
      for (double x : o.bath_ground_probability) pb.push_back(x);
      e.insert_or_assign("p_closed", std::move(pc));
      e.insert_or_assign("p_bath", std::move(pb));
      put(e, "closed_tts_infinite", std::isinf(o.tts_ns));
      if (std::isfinite(o.tts_ns)) put(e, "closed_tts_ns", o.tts_ns);
      put(e, "bath_tts_infinite", std::isinf(o.bath_tts_ns));
      if (std::isfinite(o.bath_tts_ns)) put(e, "bath_tts_ns", o.bath_tts_ns);
      per.push_back(std::move(e));
    }
    j.insert_or_assign("open_system", std::move(per));
  }
  if (!csv.empty()) write_file_atomically(csv, ensemble_size_table(r).csv());
  std::cout << to_json(j) << "\n";
}

}  // namespace gapwise
