// `gapwise pause-map PROBLEM SCHEDULE -d T --at S-LIST --pause-ns D-LIST --out map.h5`:
// p over pause location x pause duration, at equal cost; threaded, resumable.
#include <algorithm>
#include <cmath>
#include <iostream>
#include <limits>
#include <memory>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "cli/journaled_run.hpp"
#include "io/bath_attributes.hpp"
#include "io/output_paths.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/hdf5_output.hpp"
#include "io/infinite_tts.hpp"
#include "io/input_error.hpp"
#include "io/json_summary.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
#include "io/toml_reader.hpp"
#include "cli/bath_option.hpp"
#include "studies/shape_maps.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct PauseMapCli {
  double frame_above = std::numeric_limits<double>::quiet_NaN();  ///< --frame-above (NaN: the cost model)
  std::string problem, schedule, out, durations, at = "lin:0.2:0.8:7", pause_ns = "0,5,10,20", cost = "total", propagator = "auto", bath;
  double duration_ns = 0;  // from `durations`, one value
  double tolerance = 1e-6, target = kDefaultTargetProbability;
  int threads = 0, bath_levels = 0;
  bool json = false, allow_long = false, fresh = false, quiet = false;
};

// The open-system map: p with the bath per cell and per unpaused reference.
struct OpenPauseMap {
  const OhmicBath* bath = nullptr;
  std::vector<double> p, reference;  ///< p row-major (rows: --at), reference per pause length
  std::vector<OpenAnnealResult> runs;  ///< every open-system run, for the method report
};

void print_pause_map_json(const PauseMapCli& o, const PauseMapOptions& mo, const PauseMap& m, std::size_t bi,
                          std::size_t bj, double reference_tts, const OpenPauseMap& open) {
  toml::table j;
  put(j, "problem_file", o.problem);
  put(j, "schedule_file", o.schedule);
  put(j, "duration_ns", o.duration_ns);
  put(j, "cost", std::string(mo.cost == PauseCost::EqualTotal ? "equal-total" : "added-time"));
  put(j, "target", o.target);
  put(j, "out", o.out);
  put(j, "simulated", static_cast<long long>(m.simulated));
  put(j, "resumed", static_cast<long long>(m.resumed));
  toml::array at, ns, ref, rows;
  for (double v : mo.pause_s) at.push_back(v);
  for (double v : mo.pause_ns) ns.push_back(v);
  for (const auto& r : m.reference) ref.push_back(r.ground_probability);
  for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
    toml::array row;
    for (std::size_t k = 0; k < mo.pause_ns.size(); ++k) row.push_back(m.at(i, k).ground_probability);
    rows.push_back(std::move(row));
  }
  j.insert_or_assign("pause_s", std::move(at));
  j.insert_or_assign("pause_ns", std::move(ns));
  j.insert_or_assign("reference_ground_probability", std::move(ref));
  j.insert_or_assign("ground_probability", std::move(rows));
  toml::table b;
  put(b, "pause_s", mo.pause_s[bi]);
  put(b, "pause_ns", mo.pause_ns[bj]);
  put(b, "ground_probability", m.at(bi, bj).ground_probability);
  put(b, "reference_ground_probability", m.reference[bj].ground_probability);
  put(b, "gain", m.at(bi, bj).ground_probability - m.reference[bj].ground_probability);
  put_tts(b, "tts_ns", m.tts_ns(bi, bj));
  put_tts(b, "reference_tts_ns", reference_tts);
  j.insert_or_assign("best", std::move(b));
  if (open.bath) {
    // The same grid with the bath, its best cell, and how the open system was run.
    toml::table bt;
    put(bt, "file", open.bath->source);
    put(bt, "temperature_mk", open.bath->temperature_mk);
    put(bt, "theta_ghz", open.bath->theta_ghz());
    put(bt, "coupling", open.bath->coupling);
    put(bt, "cutoff_ghz", open.bath->cutoff_ghz);
    j.insert_or_assign("bath", std::move(bt));
    toml::table os;
    const std::size_t nj = mo.pause_ns.size();
    toml::array orows, oref;
    for (double v : open.reference) oref.push_back(v);
    std::size_t oi = 0, oj = 0;
    double obest = -2;
    for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
      toml::array row;
      for (std::size_t k = 0; k < nj; ++k) {
        const double v = open.p[i * nj + k];
        row.push_back(v);
        if (v - open.reference[k] > obest) { obest = v - open.reference[k]; oi = i; oj = k; }
      }
      orows.push_back(std::move(row));
    }
    os.insert_or_assign("ground_probability", std::move(orows));
    os.insert_or_assign("reference_ground_probability", std::move(oref));
    const OpenAnnealResult& first = open.runs.front();
    put(os, "method", first.propagator);
    put(os, "levels_choice", std::string(first.levels == 0 ? "all levels"
                                         : first.levels_fixed ? "fixed, not checked" : "automatic"));
    long long kmax = 0;
    double trace = 0, mineig = 0;
    for (const auto& r : open.runs) {
      kmax = std::max<long long>(kmax, r.levels);
      trace = std::max(trace, r.stats.max_trace_deviation);
      mineig = std::min(mineig, r.stats.min_eigenvalue);
    }
    put(os, "largest_levels", kmax);
    put(os, "max_trace_deviation", trace);
    put(os, "min_eigenvalue", mineig);
    toml::table ob;
    put(ob, "pause_s", mo.pause_s[oi]);
    put(ob, "pause_ns", mo.pause_ns[oj]);
    put(ob, "ground_probability", open.p[oi * nj + oj]);
    put(ob, "reference_ground_probability", open.reference[oj]);
    put(ob, "gain", obest);
    os.insert_or_assign("best", std::move(ob));
    j.insert_or_assign("open_system", std::move(os));
  }
  std::cout << to_json(j) << "\n";
}

void run_pause_map(PauseMapCli o) {
  const RunInputs loaded = load_run_inputs(RunFiles{}.problem(o.problem).schedule(o.schedule).bath(o.bath).plan(
      FilePlan{}.output(o.out, "--out").journal_of(o.out)));
  const IsingProblem& p = loaded.problem();
  const Schedule& sch = loaded.schedule;
  const std::optional<OhmicBath>& bath = loaded.bath;
  check_bath_levels(o.bath_levels, bath.has_value(), p.qubits);
  check_output_path(o.out, "--out");
  check_target_probability(o.target);
  check_tolerance(o.tolerance);
  check_frame_above(o.frame_above, o.propagator);
  check_threads(o.threads);
  loaded.check_memory(10);
  PauseMapOptions mo;
  o.duration_ns = parse_single_value(o.durations, "--durations", ListOf::Durations, "a pause map holds one anneal duration",
                                     "give one duration and run one map per duration");
  mo.pause_s = parse_value_list(o.at, "--at");
  mo.pause_ns = parse_value_list(o.pause_ns, "--pause-ns", ListOf::Durations);
  mo.duration_ns = o.duration_ns;
  mo.cost = o.cost == "added" ? PauseCost::AddedTime : PauseCost::EqualTotal;
  mo.target_probability = o.target;
  mo.threads = o.threads;
  SimulationOptions sim;
  sim.propagator = o.propagator;
  sim.choice.frame_above_ns = o.frame_above;
  sim.propagation.tolerance = o.tolerance;
  WorkEstimate work;
  for (double pause : mo.pause_ns) {
    const double run_ns = mo.cost == PauseCost::AddedTime ? o.duration_ns + pause : o.duration_ns;
    work += anneal_work(p, sch.scales, run_ns, static_cast<double>(mo.pause_s.size()) + 1.0);  // + the unpaused reference
  }
  check_work_limit(work, o.allow_long, {"--pause-ns", 0, 0, "--pause-ns"});
  const AnnealSetup setup(p, sch, sim);
  JournaledRun run(o.out, o.fresh, pause_map_journal_layout(),
                   input_fingerprint({read_text_file(o.problem), read_text_file(o.schedule), fmt::format("{:a}", o.duration_ns),
                                      o.cost, fmt::format("{:a}", o.tolerance), o.propagator}),
                   {o.out});
  const PauseMap m = pause_map(setup, mo, run.journal(), AnnealCounter(o.quiet));
  const bool tty = ::isatty(2) && !o.quiet;
  // With the bath: the same paths once more, open system (serial, not journaled).
  OpenPauseMap open;
  std::vector<double>& open_p = open.p;
  std::vector<double>& open_ref = open.reference;
  if (bath) {
    open.bath = &*bath;
    const auto paths = pause_map_paths(setup, mo);
    std::size_t done = 0;
    std::map<std::vector<double>, double> value;
    for (const auto& [key, path] : paths) {
      open.runs.push_back(simulate_open_anneal(setup.hamiltonian, setup.ground, sch.scales, path, setup.start, *bath,
                                               open_propagator_options(o.tolerance, o.bath_levels)));
      value[key] = open.runs.back().ground_probability;
      if (tty) std::cerr << fmt::format("\r{} / {} anneals with the bath", ++done, paths.size()) << std::flush;
    }
    if (tty) std::cerr << "\n";
    for (double d : mo.pause_ns) open_ref.push_back(value.at(pause_map_reference_key(mo, d)));
    for (double s : mo.pause_s)
      for (double d : mo.pause_ns) open_p.push_back(d > 0 ? value.at({s, d}) : value.at(pause_map_reference_key(mo, d)));
  }

  std::size_t bi = 0, bj = 0;  // the largest gain over the unpaused run of the same cost
  double best = -1;
  for (std::size_t i = 0; i < mo.pause_s.size(); ++i)
    for (std::size_t j = 0; j < mo.pause_ns.size(); ++j) {
      const double gain = m.at(i, j).ground_probability - m.reference[j].ground_probability;
      if (gain > best) { best = gain; bi = i; bj = j; }
    }
  const MapPoint& b = m.at(bi, bj);
  const double reference_tts =
      time_to_solution(m.reference[bj].total_ns, std::clamp(m.reference[bj].ground_probability, 0.0, 1.0), o.target).tts_ns;
  if (o.json) {
    print_pause_map_json(o, mo, m, bi, bj, reference_tts, open);
  } else {
    std::cout << fmt::format("problem   {} ({} qubits); schedule {}\n", terminal_text(o.problem), p.qubits, terminal_text(o.schedule));
    std::cout << fmt::format("cost      {}\n", mo.cost == PauseCost::EqualTotal
                                                  ? fmt::format("equal total: every run takes {} ns, the pause eats into the ramp", o.duration_ns)
                                                  : fmt::format("added time: the ramp takes {} ns, the run {} ns + pause", o.duration_ns, o.duration_ns));
    std::cout << fmt::format("points    {} simulated, {} read back from {}\n\n", m.simulated, m.resumed, run.journal()->path());
    std::vector<std::string> head{"pause at s \\ pause ns"};
    for (double d : mo.pause_ns) head.push_back(fmt_num(d, 6));
    TextTable t(head);
    std::vector<std::string> ref{"no pause (same cost)"};
    for (const auto& r : m.reference) ref.push_back(fmt_num(r.ground_probability, 6));
    t.add(ref);
    for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
      std::vector<std::string> row{fmt_num(mo.pause_s[i], 6)};
      for (std::size_t j = 0; j < mo.pause_ns.size(); ++j) row.push_back(fmt_num(m.at(i, j).ground_probability, 6));
      t.add(row);
    }
    std::cout << "ground-state probability p\n" << t.render();
    std::cout << fmt::format("\nbest pause: s = {}, {} ns: p = {:.6f} against {:.6f} without a pause at the same cost ({:+.6f}); "
                             "TTS {} ns against {} ns\n",
                             fmt_num(mo.pause_s[bi], 6), fmt_num(mo.pause_ns[bj], 6), b.ground_probability, m.reference[bj].ground_probability, best,
                             tts_text(m.tts_ns(bi, bj), 6), tts_text(reference_tts, 6));
    if (bath) {
      std::cout << "\nwith the bath (adiabatic master equation; " << bath->summary() << ")\n";
      TextTable tb(head);
      std::vector<std::string> rref{"no pause (same cost)"};
      for (double v : open_ref) rref.push_back(fmt_num(v, 6));
      tb.add(rref);
      std::size_t oi = 0, oj = 0;
      double obest = -2;
      for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
        std::vector<std::string> row{fmt_num(mo.pause_s[i], 6)};
        for (std::size_t j = 0; j < mo.pause_ns.size(); ++j) {
          const double v = open_p[i * mo.pause_ns.size() + j];
          row.push_back(fmt_num(v, 6));
          if (v - open_ref[j] > obest) { obest = v - open_ref[j]; oi = i; oj = j; }
        }
        tb.add(row);
      }
      std::cout << "ground-state probability p with the bath\n" << tb.render();
      std::cout << fmt::format("best pause with the bath: s = {}, {} ns: p = {:.6f} against {:.6f} without a pause at the same "
                               "cost ({:+.6f})\n",
                               fmt_num(mo.pause_s[oi], 6), fmt_num(mo.pause_ns[oj], 6),
                               open_p[oi * mo.pause_ns.size() + oj], open_ref[oj], obest);
    }
  }

  Hdf5Output h5(o.out, {"gapwise-pause-map", 1});
  write_provenance(h5, command_line(), {o.problem, o.schedule});
  std::vector<double> pg, tts, tot, nd;
  for (std::size_t i = 0; i < mo.pause_s.size(); ++i)
    for (std::size_t j = 0; j < mo.pause_ns.size(); ++j) {
      pg.push_back(m.at(i, j).ground_probability);
      tts.push_back(stored_tts(m.tts_ns(i, j)));
      tot.push_back(m.at(i, j).total_ns);
      nd.push_back(m.at(i, j).norm_drift);
    }
  const std::size_t ni = mo.pause_s.size(), nj = mo.pause_ns.size();
  h5.write("/pause_map/pause_s", mo.pause_s, "1");
  h5.write("/pause_map/pause_ns", mo.pause_ns, "ns");
  h5.write_matrix("/pause_map/ground_probability", pg, ni, nj, "1", {"/pause_map/pause_s", "/pause_map/pause_ns"});
  h5.write_matrix("/pause_map/tts_ns", tts, ni, nj, tts_meaning("ns"), {"/pause_map/pause_s", "/pause_map/pause_ns"});
  h5.write_matrix("/pause_map/total_ns", tot, ni, nj, "ns", {"/pause_map/pause_s", "/pause_map/pause_ns"});
  h5.write_matrix("/pause_map/norm_drift", nd, ni, nj, "1", {"/pause_map/pause_s", "/pause_map/pause_ns"});
  std::vector<double> rp, rt;
  for (const auto& r : m.reference) { rp.push_back(r.ground_probability); rt.push_back(r.total_ns); }
  h5.write("/pause_map/reference_ground_probability", rp, "1");
  h5.write("/pause_map/reference_total_ns", rt, "ns");
  h5.attribute("/pause_map", "duration_ns", o.duration_ns);
  h5.attribute("/pause_map", "cost", mo.cost == PauseCost::EqualTotal ? "equal-total" : "added-time");
  h5.attribute("/pause_map", "target_probability", o.target);
  h5.attribute("/pause_map", "tolerance", o.tolerance);
  if (bath) {
    h5.write_matrix("/pause_map/open_system/ground_probability", open_p, ni, nj, "1",
                    {"/pause_map/pause_s", "/pause_map/pause_ns"});
    h5.write("/pause_map/open_system/reference_ground_probability", open_ref, "1");
    h5.attach_scales("/pause_map/open_system/reference_ground_probability", {"/pause_map/pause_ns"});
    h5.attribute("/pause_map/open_system", "method", open.runs.front().propagator);
    h5.attribute("/pause_map/open_system", "levels_choice",
                 std::string(open.runs.front().levels == 0 ? "all levels"
                             : open.runs.front().levels_fixed ? "fixed, not checked" : "automatic"));
    write_bath_attributes(h5, "/pause_map/open_system", *bath);
  }
  h5.commit();
  if (!o.json) std::cout << fmt::format("wrote {}\n", o.out);
}

}  // namespace

void register_pause_map(CLI::App& app) {
  auto o = std::make_shared<PauseMapCli>();
  CLI::App* sub = app.add_subcommand("pause-map",
      "Does a pause help, where and for how long? Ground-state probability over pause location\n"
      "(--at, schedule parameter s) x pause duration (--pause-ns), inserted into SCHEDULE's path, at\n"
      "equal cost: with --cost total (default) every run takes --durations and the pause eats\n"
      "into the ramp; with --cost added the ramp keeps --durations and the pause adds to it\n"
      "(the unpaused reference is then stretched to the same total, and TTS counts the pause).\n"
      "Runs in parallel (OpenMP; same numbers at any thread count) and resumes: finished points\n"
      "are journaled beside --out and a rerun skips them (also after Ctrl-C).\n"
      "Example: gapwise pause-map data-samples/triangle.toml schedules/linear.toml -d 5 \\\n"
      "           --at lin:0.3:0.9:7 --pause-ns 0,1,2,4 --out pause-map.h5");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "forward schedule: its scales and path shape")->required()->check(readable_input_file());
  add_durations_option(sub, o->durations, "anneal duration T in ns, one value (see --cost)")->required();
  add_list_option(sub, "--at", o->at, "pause locations s, a LIST such as 0.3,0.5 or lin:0.3:0.9:7")->capture_default_str();
  add_list_option(sub, "--pause-ns", o->pause_ns, "pause durations in ns (0: no pause), a LIST")->capture_default_str();
  sub->add_option("--cost", o->cost, "\"total\": runs take T; \"added\": runs take T + pause")
      ->check(CLI::IsMember({"total", "added"}))->capture_default_str();
  sub->add_option("--target", o->target, "target success probability of the time to solution")->capture_default_str();
  sub->add_option("--tolerance", o->tolerance, "target accuracy of p")->capture_default_str();
  list_propagator_names(sub->add_option("--propagator", o->propagator, "which propagator runs the dynamics")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  add_frame_above_option(sub, o->frame_above);
  sub->add_option("--threads", o->threads, "OpenMP threads (0: default)")->capture_default_str();
  sub->add_option("-o,--out", o->out, "HDF5 result (heat-map ready); the journal is <out>.journal")->required();
  sub->add_flag("--fresh", o->fresh, "discard the journal of an earlier run and start afresh");
  sub->add_flag("-q,--quiet", o->quiet, "no progress on stderr");
  add_bath_option(sub, o->bath);
  add_bath_levels_option(sub, o->bath_levels);
  add_allow_long_flag(sub, o->allow_long);
  sub->add_flag("--json", o->json,
                "print a JSON summary instead of the table: the grid, p per cell (rows: --at), the unpaused\n"
                "reference per pause duration, and the best cell (largest gain over its reference)");
  sub->callback([o] { run_pause_map(*o); });
}

}  // namespace gapwise::cli
