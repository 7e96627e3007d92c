#include "io/ensemble_result_file.hpp"

#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "io/hdf5_input.hpp"
#include "io/hdf5_output.hpp"
#include "io/infinite_tts.hpp"
#include "io/bath_attributes.hpp"

namespace gapwise {
namespace {

constexpr const char* kFormat = "gapwise-ensemble-result";
const double kInf = std::numeric_limits<double>::infinity();

template <class F>
std::vector<double> column(const std::vector<InstanceOutcome>& v, F f) {
  std::vector<double> c;
  for (const auto& o : v) c.push_back(static_cast<double>(f(o)));
  return c;
}
template <class F>
std::vector<long long> int_column(const std::vector<InstanceOutcome>& v, F f) {
  std::vector<long long> c;
  for (const auto& o : v) c.push_back(static_cast<long long>(f(o)));
  return c;
}

}  // namespace

void write_ensemble_result(const std::string& path, const EnsembleResult& r, const std::string& command_line,
                           const std::vector<std::string>& input_files) {
  Hdf5Output out(path, {kFormat, 2, /*sealed=*/true});  // version 2: infinite TTS as +inf (was -1)
  write_provenance(out, command_line, input_files);
  const std::string e = "/ensemble";
  const EnsembleSettings& st = r.settings;
  out.attribute(e, "instance_set", r.set_source);
  out.attribute(e, "set_fingerprint", r.set_fingerprint);
  out.attribute(e, "set_size", static_cast<long long>(r.set_size));
  out.attribute(e, "numerics_fingerprint", r.numerics_fingerprint);
  out.attribute(e, "schedule_text", r.schedule_text);
  out.attribute(e, "target_probability", st.target_probability);
  out.attribute(e, "propagator", st.simulation.propagator);
  out.attribute(e, "tolerance", st.simulation.propagation.tolerance);
  out.attribute(e, "gap_coarse_points", static_cast<long long>(st.gap_coarse_points));
  out.attribute(e, "gap_s_tolerance", st.gap_s_tolerance);
  out.attribute(e, "confidence_level", st.confidence_level);
  out.attribute(e, "bootstrap_resamples", static_cast<long long>(st.bootstrap_resamples));
  out.attribute(e, "bootstrap_seed", static_cast<long long>(st.bootstrap_seed));
  out.attribute(e, "shard_index", static_cast<long long>(r.shard.index));
  out.attribute(e, "shard_count", static_cast<long long>(r.shard.count));
  out.write(e + "/durations_ns", st.durations_ns, "ns");
  out.write(e + "/quantile_levels", st.quantile_levels, "1");

  const auto& v = r.instances;
  const std::string g = e + "/instances";
  out.group(g);
  out.write(g + "/set_index", int_column(v, [](auto& o) { return o.set_index; }), DataMeaning("1").described("index into the instance set"));
  std::vector<std::string> names;
  for (const auto& o : v) names.push_back(o.name);
  out.write_strings(g + "/name", names, "instance names");
  out.write(g + "/qubits", int_column(v, [](auto& o) { return o.qubits; }), "1");
  out.write(g + "/ground_energy", column(v, [](auto& o) { return o.ground_energy; }), DataMeaning("1").described("in the problem's own units"));
  out.write(g + "/ground_states", int_column(v, [](auto& o) { return o.ground_states; }), "1");
  out.write(g + "/planted_check", int_column(v, [](auto& o) { return o.planted_check; }),
            DataMeaning("1").flagged({-1, 0, 1}, "not_planted differs equals")
                .described("-1 not planted, 1 brute force equals planted energy, 0 it does not"));
  out.write(g + "/gap_ghz", column(v, [](auto& o) { return o.gap_ghz; }), "GHz");
  out.write(g + "/gap_uncertainty_ghz", column(v, [](auto& o) { return o.gap_uncertainty_ghz; }), "GHz");
  out.write(g + "/gap_s", column(v, [](auto& o) { return o.gap_s; }), "1");
  out.write(g + "/gap_degeneracy", int_column(v, [](auto& o) { return o.gap_degeneracy; }), DataMeaning("1").described("g of E_g - E_0"));
  out.write(g + "/gap_at_end_point", int_column(v, [](auto& o) { return o.gap_at_end_point; }), DataMeaning("1").flagged({0, 1}, "no yes"));
  out.write(g + "/max_norm_drift", column(v, [](auto& o) { return o.max_norm_drift; }), "1");
  out.write(g + "/tts_ns", column(v, [](auto& o) { return stored_tts(o.tts_ns); }), tts_meaning("ns").described("+inf exactly where tts_never is 1"));
  out.write(g + "/tts_never", int_column(v, [](auto& o) { return std::isinf(o.tts_ns); }), DataMeaning("1").flagged({0, 1}, "solved never").described("1: p was 0 at every duration"));
  out.write(g + "/tts_duration_ns", column(v, [](auto& o) { return o.tts_duration_ns; }), "ns");
  out.write(g + "/tts_at_range_edge", int_column(v, [](auto& o) { return o.tts_at_range_edge; }), DataMeaning("1").flagged({0, 1}, "no yes"));
  std::vector<double> p;
  for (const auto& o : v) p.insert(p.end(), o.ground_probability.begin(), o.ground_probability.end());
  out.write_matrix(g + "/ground_probability", p, v.size(), st.durations_ns.size(), "1", {g + "/set_index", e + "/durations_ns"});
  std::vector<std::string> used;
  for (const auto& o : v)
    for (std::size_t k = 0; k < st.durations_ns.size(); ++k)
      used.push_back(k < o.propagator_used.size() && !o.propagator_used[k].empty() ? o.propagator_used[k] : "unknown");
  out.write_strings(g + "/propagator_used", used,
                    "the propagator that ran each anneal (with --propagator auto: split-auto or frame, chosen by "
                    "cost); row-major over (instances, durations_ns), the order of ground_probability's elements");
  if (st.bath) {
    // --bath: the bath (attributes of /ensemble/bath) and the same numbers with it,
    // beside the closed ones; these datasets exist only in a result run with a bath.
    write_bath_attributes(out, e + "/bath", *st.bath);
    out.attribute(e + "/bath", "open_method", st.open.method);
    out.attribute(e + "/bath", "open_levels", static_cast<long long>(st.open.levels));
    out.attribute(e + "/bath", "open_check_levels", static_cast<long long>(st.open.check_levels));
    out.attribute(e + "/bath", "open_tolerance", st.open.tolerance);
    std::vector<double> pb;
    for (const auto& o : v) pb.insert(pb.end(), o.bath_ground_probability.begin(), o.bath_ground_probability.end());
    out.write_matrix(g + "/bath_ground_probability", pb, v.size(), st.durations_ns.size(),
                     DataMeaning("1").described("p(t_f) with the bath (adiabatic master equation); never NaN"),
                     {g + "/set_index", e + "/durations_ns"});
    out.write(g + "/bath_tts_ns", column(v, [](auto& o) { return stored_tts(o.bath_tts_ns); }),
              tts_meaning("ns").described("best TTS with the bath; +inf exactly where bath_tts_never is 1"));
    out.write(g + "/bath_tts_never", int_column(v, [](auto& o) { return std::isinf(o.bath_tts_ns); }),
              DataMeaning("1").flagged({0, 1}, "solved never").described("1: p with the bath was 0 at every duration"));
    out.write(g + "/bath_tts_duration_ns", column(v, [](auto& o) { return o.bath_tts_duration_ns; }), "ns");
    out.write(g + "/bath_tts_at_range_edge", int_column(v, [](auto& o) { return o.bath_tts_at_range_edge; }),
              DataMeaning("1").flagged({0, 1}, "no yes"));
    out.write(g + "/bath_max_trace_error", column(v, [](auto& o) { return o.bath_max_trace_error; }),
              DataMeaning("1").described("largest |Tr rho - 1| along the runs with the bath"));
    out.write(g + "/bath_min_eigenvalue", column(v, [](auto& o) { return o.bath_min_eigenvalue; }),
              DataMeaning("1").described("smallest eigenvalue of rho at the end of any run with the bath"));
  }

  const std::string b = e + "/by_size";
  out.group(b);
  std::vector<long long> qubits, count, edge, never;
  for (const auto& s : r.sizes) {
    qubits.push_back(s.qubits);
    count.push_back(static_cast<long long>(s.tts_ns.count));
    edge.push_back(static_cast<long long>(s.tts_at_range_edge));
    never.push_back(static_cast<long long>(s.never_solved));
  }
  out.write(b + "/qubits", qubits, "1");
  out.write(b + "/count", count, DataMeaning("1").described("number of instances"));
  out.write(b + "/tts_at_range_edge", edge, DataMeaning("1").described("number of instances"));
  out.write(b + "/never_solved", never, DataMeaning("1").described("number of instances"));
  if (st.bath) {
    std::vector<long long> bedge, bnever;
    for (const auto& s : r.sizes) {
      bedge.push_back(static_cast<long long>(s.bath_tts_at_range_edge));
      bnever.push_back(static_cast<long long>(s.bath_never_solved));
    }
    out.write(b + "/bath_tts_at_range_edge", bedge, DataMeaning("1").described("number of instances, with the bath"));
    out.write(b + "/bath_never_solved", bnever, DataMeaning("1").described("number of instances, with the bath"));
  }
  const std::size_t rows = r.sizes.size(), cols = st.quantile_levels.size();
  auto table = [&](const std::string& name, auto pick, auto value, const DataMeaning& unit) {
    std::vector<double> t;
    for (const auto& s : r.sizes)
      for (const auto& q : pick(s).quantiles) t.push_back(stored_tts(value(q)));
    out.write_matrix(b + "/" + name, t, rows, cols, unit, {b + "/qubits", e + "/quantile_levels"});
  };
  auto tts = [](const SizeSummary& s) -> const SampleSummary& { return s.tts_ns; };
  auto gap = [](const SizeSummary& s) -> const SampleSummary& { return s.gap_ghz; };
  auto val = [](const QuantileEstimate& q) { return q.value; };
  auto low = [](const QuantileEstimate& q) { return q.interval.low; };
  auto high = [](const QuantileEstimate& q) { return q.interval.high; };
  table("tts_quantile_ns", tts, val, tts_meaning("ns"));
  table("tts_low_ns", tts, low, tts_meaning("ns"));
  table("tts_high_ns", tts, high, tts_meaning("ns"));
  table("gap_quantile_ghz", gap, val, "GHz");
  table("gap_low_ghz", gap, low, "GHz");
  table("gap_high_ghz", gap, high, "GHz");
  if (st.bath) {
    auto btts = [](const SizeSummary& s) -> const SampleSummary& { return s.bath_tts_ns; };
    table("bath_tts_quantile_ns", btts, val, tts_meaning("ns"));
    table("bath_tts_low_ns", btts, low, tts_meaning("ns"));
    table("bath_tts_high_ns", btts, high, tts_meaning("ns"));
  }

  out.write("/timing/wall_seconds", column(v, [](auto& o) { return o.wall_seconds; }), "s");
  out.attribute("/timing", "distribution", r.distribution);
  out.attribute("/timing", "total_wall_seconds", r.wall_seconds);
  out.attribute("/timing", "resumed", static_cast<long long>(r.resumed));
  out.attribute("/timing", "computed", static_cast<long long>(r.computed));
  out.commit();
}

EnsembleResult read_ensemble_result(const std::string& path) {
  const Hdf5Input in(path, kFormat);
  const std::string e = "/ensemble";
  const long long version = in.attribute_int("/", "format_version");
  if (version != 1 && version != 2)  // 1 stored an infinite TTS as -1; tts_never says which, as in 2
    in.fail("@format_version", "this ensemble result format version is not known", "write it with this gapwise");
  EnsembleResult r;
  EnsembleSettings& st = r.settings;
  r.set_source = in.attribute_string(e, "instance_set");
  r.set_fingerprint = in.attribute_string(e, "set_fingerprint");
  r.set_size = static_cast<std::size_t>(in.attribute_int(e, "set_size"));
  r.numerics_fingerprint = in.attribute_string(e, "numerics_fingerprint");
  r.schedule_text = in.attribute_string(e, "schedule_text");
  st.target_probability = in.attribute_double(e, "target_probability");
  st.simulation.propagator = in.attribute_string(e, "propagator");
  st.simulation.propagation.tolerance = in.attribute_double(e, "tolerance");
  st.gap_coarse_points = static_cast<int>(in.attribute_int(e, "gap_coarse_points"));
  st.gap_s_tolerance = in.attribute_double(e, "gap_s_tolerance");
  st.confidence_level = in.attribute_double(e, "confidence_level");
  st.bootstrap_resamples = static_cast<int>(in.attribute_int(e, "bootstrap_resamples"));
  st.bootstrap_seed = static_cast<std::uint64_t>(in.attribute_int(e, "bootstrap_seed"));
  r.shard.index = static_cast<int>(in.attribute_int(e, "shard_index"));
  r.shard.count = static_cast<int>(in.attribute_int(e, "shard_count"));
  if (r.shard.count < 1 || r.shard.index < 0 || r.shard.index >= r.shard.count)
    in.fail(e + "@shard_index", "the shard numbers are inconsistent", "write the file with gapwise");
  st.durations_ns = in.read_list(e + "/durations_ns");
  st.quantile_levels = in.read_list(e + "/quantile_levels");
  const std::size_t k = st.durations_ns.size();

  const std::string g = e + "/instances";
  const auto idx = in.read_int_list(g + "/set_index");
  const std::size_t n = idx.size();
  const auto names = in.read_strings(g + "/name", n);
  const auto qubits = in.read_int_list(g + "/qubits", n);
  const auto ge = in.read_list(g + "/ground_energy", n);
  const auto gs = in.read_int_list(g + "/ground_states", n);
  const auto pc = in.read_int_list(g + "/planted_check", n);
  const auto gap = in.read_list(g + "/gap_ghz", n);
  const auto gu = in.read_list(g + "/gap_uncertainty_ghz", n);
  const auto gsx = in.read_list(g + "/gap_s", n);
  const auto gd = in.read_int_list(g + "/gap_degeneracy", n);
  const auto ge2 = in.read_int_list(g + "/gap_at_end_point", n);
  const auto drift = in.read_list(g + "/max_norm_drift", n);
  const auto tts = in.read_list(g + "/tts_ns", n);
  const auto never = in.read_int_list(g + "/tts_never", n);
  const auto td = in.read_list(g + "/tts_duration_ns", n);
  const auto edge = in.read_int_list(g + "/tts_at_range_edge", n);
  const auto p = in.read(g + "/ground_probability");
  if (p.size() != n * k) in.fail(g + "/ground_probability", fmt::format("expected {} x {} values", n, k), "write the file with gapwise");
  const auto wall = in.read_list("/timing/wall_seconds", n);
  // Files written before the record existed have no propagator_used: "unknown".
  const std::vector<std::string> used =
      in.has(g + "/propagator_used") ? in.read_strings(g + "/propagator_used", n * k) : std::vector<std::string>(n * k, "unknown");
  const bool with_bath = in.has(e + "/bath");
  std::vector<double> bp, btts, btd, btrace, beig;
  std::vector<long long> bnever, bedge;
  if (with_bath) {
    OhmicBath bath;
    bath.source = in.attribute_string(e + "/bath", "bath_file");
    bath.temperature_mk = in.attribute_double(e + "/bath", "temperature_mk");
    bath.coupling = in.attribute_double(e + "/bath", "coupling");
    bath.cutoff_ghz = in.attribute_double(e + "/bath", "cutoff_ghz");
    st.bath = bath;
    st.open.method = in.attribute_string(e + "/bath", "open_method");
    st.open.levels = static_cast<int>(in.attribute_int(e + "/bath", "open_levels"));
    st.open.check_levels = in.attribute_int(e + "/bath", "open_check_levels") != 0;
    st.open.tolerance = in.attribute_double(e + "/bath", "open_tolerance");
    bp = in.read(g + "/bath_ground_probability");
    if (bp.size() != n * k)
      in.fail(g + "/bath_ground_probability", fmt::format("expected {} x {} values", n, k), "write the file with gapwise");
    btts = in.read_list(g + "/bath_tts_ns", n);
    bnever = in.read_int_list(g + "/bath_tts_never", n);
    btd = in.read_list(g + "/bath_tts_duration_ns", n);
    bedge = in.read_int_list(g + "/bath_tts_at_range_edge", n);
    btrace = in.read_list(g + "/bath_max_trace_error", n);
    beig = in.read_list(g + "/bath_min_eigenvalue", n);
  }
  for (std::size_t i = 0; i < n; ++i) {
    if (idx[i] < 0 || static_cast<std::size_t>(idx[i]) >= r.set_size || (i && idx[i] <= idx[i - 1]))
      in.fail(fmt::format("{}/set_index[{}]", g, i), "set indices must be ascending and inside the set", "write the file with gapwise");
    InstanceOutcome o;
    o.set_index = static_cast<std::size_t>(idx[i]);
    o.name = names[i];
    o.qubits = static_cast<int>(qubits[i]);
    o.ground_energy = ge[i];
    o.ground_states = gs[i];
    o.planted_check = static_cast<int>(pc[i]);
    o.gap_ghz = gap[i];
    o.gap_uncertainty_ghz = gu[i];
    o.gap_s = gsx[i];
    o.gap_degeneracy = static_cast<int>(gd[i]);
    o.gap_at_end_point = ge2[i] != 0;
    o.max_norm_drift = drift[i];
    o.tts_ns = never[i] ? kInf : tts[i];
    o.tts_duration_ns = td[i];
    o.tts_at_range_edge = edge[i] != 0;
    o.ground_probability.assign(p.begin() + static_cast<long>(i * k), p.begin() + static_cast<long>((i + 1) * k));
    o.wall_seconds = wall[i];
    o.propagator_used.assign(used.begin() + static_cast<long>(i * k), used.begin() + static_cast<long>((i + 1) * k));
    if (with_bath) {
      o.bath_ground_probability.assign(bp.begin() + static_cast<long>(i * k), bp.begin() + static_cast<long>((i + 1) * k));
      o.bath_tts_ns = bnever[i] ? kInf : btts[i];
      o.bath_tts_duration_ns = btd[i];
      o.bath_tts_at_range_edge = bedge[i] != 0;
      o.bath_max_trace_error = btrace[i];
      o.bath_min_eigenvalue = beig[i];
    }
    r.instances.push_back(std::move(o));
  }
  r.sizes = summarize_by_size(r.instances, st);  // recomputed: identical by construction (seeded)
  r.distribution = in.attribute_string("/timing", "distribution");
  r.wall_seconds = in.attribute_double("/timing", "total_wall_seconds");
  r.resumed = static_cast<std::size_t>(in.attribute_int("/timing", "resumed"));
  r.computed = static_cast<std::size_t>(in.attribute_int("/timing", "computed"));
  r.complete_here = true;
  return r;
}

}  // namespace gapwise
