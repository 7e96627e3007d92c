#include "io/ensemble_report.hpp"

#include <cmath>
#include <iostream>

#include <fmt/format.h>

#include "io/atomic_file.hpp"
#include "io/infinite_tts.hpp"
#include "io/json_summary.hpp"

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
  TextTable t(head);
  for (const auto& s : r.sizes) {
    std::vector<std::string> row = {std::to_string(s.qubits), std::to_string(s.tts_ns.count)};
    for (const auto& q : s.tts_ns.quantiles) row.push_back(interval_text(q, 4));
    for (const auto& q : s.gap_ghz.quantiles) row.push_back(fmt_num(q.value, 4));
    row.push_back(std::to_string(s.tts_at_range_edge));
    row.push_back(std::to_string(s.never_solved));
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
    edge += static_cast<long long>(s.tts_at_range_edge);
    never += static_cast<long long>(s.never_solved);
    sizes.push_back(std::move(e));
  }
  put(j, "tts_at_range_edge", edge);
  put(j, "never_solved", never);
  put(j, "planted_instances", planted);
  put(j, "planted_ground_energy_confirmed", planted_ok);
  j.insert_or_assign("sizes", std::move(sizes));
  if (!csv.empty()) write_file_atomically(csv, ensemble_size_table(r).csv());
  std::cout << to_json(j) << "\n";
}

}  // namespace gapwise
