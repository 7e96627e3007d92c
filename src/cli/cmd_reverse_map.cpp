// `gapwise reverse-map PROBLEM SCHEDULE --turn S-LIST --dwell-ns D-LIST --ramp-ns R --out rev.h5`:
// does a reverse anneal from a classical guess return the ground state?
#include <iostream>
#include <limits>
#include <memory>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "cli/journaled_run.hpp"
#include "io/output_paths.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/hdf5_output.hpp"
#include "io/infinite_tts.hpp"
#include "io/input_error.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
#include "io/toml_reader.hpp"
#include "studies/shape_maps.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct ReverseMapCli {
  double frame_above = std::numeric_limits<double>::quiet_NaN();  ///< --frame-above (NaN: the cost model)
  std::string problem, schedule, out, turn = "lin:0.3:0.9:7", dwell_ns = "0,5,10,20", start_bits, propagator = "auto";
  double ramp_ns = 5, tolerance = 1e-6, target = kDefaultTargetProbability;
  int threads = 0;
  bool allow_long = false, fresh = false, quiet = false;
};

void run_reverse_map(const ReverseMapCli& o) {
  RunInputs loaded = load_run_inputs(
      RunFiles{}.problem(o.problem).schedule(o.schedule).plan(FilePlan{}.output(o.out, "--out").journal_of(o.out)));
  const IsingProblem& p = loaded.problem();
  Schedule& sch = loaded.schedule;
  check_target_probability(o.target);
  check_tolerance(o.tolerance);
  check_frame_above(o.frame_above, o.propagator);
  check_threads(o.threads);
  loaded.check_memory(10);
  if (!o.start_bits.empty()) {
    sch.start.kind = StartKind::Classical;
    sch.start.bits.clear();
    for (char c : o.start_bits) {
      if (c == ',' || c == ' ') continue;
      if (c != '0' && c != '1')
        throw InputError({"--start-bits", 0, 0, "--start-bits"}, fmt::format("\"{}\" holds '{}'", o.start_bits, c),
                         "write the bits qubit 0 first, e.g. 0,1,0 or 010");
      sch.start.bits.push_back(c - '0');
    }
    sch.source = "--start-bits";
  }
  if (sch.start.kind != StartKind::Classical)
    throw InputError({o.schedule, 0, 0, "path.start_bits"}, "a reverse anneal needs a classical start state, and none is given",
                     "pass --start-bits 0,1,... (qubit 0 first) or use a schedule with start_bits");
  (void)start_basis_state(sch, p.qubits);  // bit count checked before any work
  if (!(o.ramp_ns > 0))
    throw InputError({"--ramp-ns", 0, 0, "--ramp-ns"}, fmt::format("ramp {} ns is not positive", o.ramp_ns), "give the ramp time in ns");
  ReverseMapOptions mo;
  mo.turn_s = parse_value_list(o.turn, "--turn");
  mo.dwell_ns = parse_value_list(o.dwell_ns, "--dwell-ns", ListOf::Durations);
  mo.ramp_ns = o.ramp_ns;
  mo.target_probability = o.target;
  mo.threads = o.threads;
  WorkEstimate work;
  for (double dwell : mo.dwell_ns) work += anneal_work(p, sch.scales, 2.0 * o.ramp_ns + dwell, static_cast<double>(mo.turn_s.size()));
  check_work_limit(work, o.allow_long, {"--dwell-ns", 0, 0, "--dwell-ns"});
  SimulationOptions sim;
  sim.propagator = o.propagator;
  sim.choice.frame_above_ns = o.frame_above;
  sim.propagation.tolerance = o.tolerance;
  const AnnealSetup setup(p, sch, sim);
  std::string bits;
  for (int b : sch.start.bits) bits += static_cast<char>('0' + b);
  JournaledRun run(o.out, o.fresh, reverse_map_journal_layout(),
                   input_fingerprint({read_text_file(o.problem), read_text_file(o.schedule), bits,
                                      fmt::format("{:a}", o.ramp_ns), fmt::format("{:a}", o.tolerance), o.propagator}),
                   {o.out});
  const ReverseMap m = reverse_map(setup, mo, run.journal(), AnnealCounter(o.quiet));

  const double e_start = p.energy(m.start_state);
  std::cout << fmt::format("problem   {} ({} qubits): ground energy {:.10g}\n", terminal_text(o.problem), p.qubits, setup.ground.energy);
  std::cout << fmt::format("start     bits {} (qubit 0 first), energy {:.10g}{}\n", bits, e_start,
                           m.start_in_ground_manifold ? " (already a ground state)" : "");
  std::cout << fmt::format("path      s = 1 -> turn point in {} ns, dwell, back to s = 1 in {} ns\n", o.ramp_ns, o.ramp_ns);
  std::cout << fmt::format("points    {} simulated, {} read back from {}\n", m.simulated, m.resumed, run.journal()->path());
  std::cout << fmt::format("propagators {} (map cells)\n\n", propagator_tally(m.points));
  std::vector<std::string> head{"turn s \\ dwell ns"};
  for (double d : mo.dwell_ns) head.push_back(fmt_num(d, 6));
  TextTable tp(head), ts(head);
  std::size_t bi = 0, bj = 0;
  for (std::size_t i = 0; i < mo.turn_s.size(); ++i) {
    std::vector<std::string> rp{fmt_num(mo.turn_s[i], 6)}, rs{fmt_num(mo.turn_s[i], 6)};
    for (std::size_t j = 0; j < mo.dwell_ns.size(); ++j) {
      rp.push_back(fmt_num(m.at(i, j).ground_probability, 6));
      rs.push_back(fmt_num(m.at(i, j).start_probability, 6));
      const double tb = time_to_solution(m.at(bi, bj).total_ns, std::clamp(m.at(bi, bj).ground_probability, 0.0, 1.0), o.target).tts_ns;
      const double tc = time_to_solution(m.at(i, j).total_ns, std::clamp(m.at(i, j).ground_probability, 0.0, 1.0), o.target).tts_ns;
      if (tc < tb) { bi = i; bj = j; }
    }
    tp.add(rp);
    ts.add(rs);
  }
  std::cout << "p of ending in the ground state\n" << tp.render();
  std::cout << "\np of ending back in the start state\n" << ts.render();
  const MapPoint& b = m.at(bi, bj);
  std::cout << fmt::format("\nbest TTS{:g}: turn s = {}, dwell {} ns: p = {:.6f}, run {} ns, TTS {} ns\n", 100 * o.target,
                           fmt_num(mo.turn_s[bi], 6), fmt_num(mo.dwell_ns[bj], 6), b.ground_probability, b.total_ns,
                           tts_text(time_to_solution(b.total_ns, std::clamp(b.ground_probability, 0.0, 1.0), o.target).tts_ns, 6));

  Hdf5Output h5(o.out, {"gapwise-reverse-map", 1});
  write_provenance(h5, command_line(), {o.problem, o.schedule});
  std::vector<double> pg, ps, tot, tts;
  for (const auto& x : m.points) {
    pg.push_back(x.ground_probability);
    ps.push_back(x.start_probability);
    tot.push_back(x.total_ns);
    tts.push_back(stored_tts(time_to_solution(x.total_ns, std::clamp(x.ground_probability, 0.0, 1.0), o.target).tts_ns));
  }
  const std::size_t ni = mo.turn_s.size(), nj = mo.dwell_ns.size();
  h5.write("/reverse_map/turn_s", mo.turn_s, "1");
  h5.write("/reverse_map/dwell_ns", mo.dwell_ns, "ns");
  h5.write_matrix("/reverse_map/ground_probability", pg, ni, nj, "1", {"/reverse_map/turn_s", "/reverse_map/dwell_ns"});
  h5.write_matrix("/reverse_map/start_probability", ps, ni, nj, "1", {"/reverse_map/turn_s", "/reverse_map/dwell_ns"});
  h5.write_matrix("/reverse_map/total_ns", tot, ni, nj, "ns", {"/reverse_map/turn_s", "/reverse_map/dwell_ns"});
  h5.write_matrix("/reverse_map/tts_ns", tts, ni, nj, tts_meaning("ns"), {"/reverse_map/turn_s", "/reverse_map/dwell_ns"});
  h5.write_strings("/reverse_map/propagator_used", propagators_used(m.points),
                   "the propagator that ran each cell (with --propagator auto: split-auto or frame, chosen by cost); "
                   "row-major over (turn_s, dwell_ns), the order of ground_probability's elements");
  h5.attribute("/reverse_map", "start_bits", bits);
  h5.attribute("/reverse_map", "ramp_ns", o.ramp_ns);
  h5.attribute("/reverse_map", "target_probability", o.target);
  h5.commit();
  std::cout << fmt::format("wrote {}\n", o.out);
}

}  // namespace

void register_reverse_map(CLI::App& app) {
  auto o = std::make_shared<ReverseMapCli>();
  CLI::App* sub = app.add_subcommand("reverse-map",
      "Does a reverse anneal from a classical guess return the ground state? Starting in the\n"
      "guess at s = 1, ramp down to a turn point (--turn), dwell (--dwell-ns), ramp back up;\n"
      "each ramp takes --ramp-ns. Reports, over turn point x dwell, the probability of ending in\n"
      "the ground state and of ending back in the guess, and the best time to solution.\n"
      "The guess comes from --start-bits or the schedule's start_bits; SCHEDULE gives the scales.\n"
      "Threaded and resumable like pause-map (journal beside --out).\n"
      "Example: gapwise reverse-map data-samples/meeting-slots-qubo.toml schedules/reverse-dwell.toml \\\n"
      "           --turn lin:0.3:0.9:7 --dwell-ns 0,10,40 --out reverse-map.h5");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "schedule: its energy scales (and start_bits, if any)")->required()->check(readable_input_file());
  sub->add_option("--start-bits", o->start_bits, "the classical guess, qubit 0 first: 0,1,0 or 010");
  add_list_option(sub, "--turn", o->turn, "turn points s, a LIST such as 0.5,0.6 or lin:0.3:0.9:7")->capture_default_str();
  add_list_option(sub, "--dwell-ns", o->dwell_ns, "dwell times at the turn point in ns, a LIST")->capture_default_str();
  sub->add_option("--ramp-ns", o->ramp_ns, "duration of each ramp (down and up), ns")->capture_default_str();
  sub->add_option("--target", o->target, "target success probability of the time to solution")->capture_default_str();
  sub->add_option("--tolerance", o->tolerance, "target accuracy of p")->capture_default_str();
  list_propagator_names(sub->add_option("--propagator", o->propagator, "which propagator runs the dynamics")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  add_frame_above_option(sub, o->frame_above);
  sub->add_option("--threads", o->threads, "OpenMP threads (0: default)")->capture_default_str();
  sub->add_option("-o,--out", o->out, "HDF5 result; the journal is <out>.journal")->required();
  sub->add_flag("--fresh", o->fresh, "discard the journal of an earlier run and start afresh");
  sub->add_flag("-q,--quiet", o->quiet, "no progress on stderr");
  add_allow_long_flag(sub, o->allow_long);
  sub->callback([o] { run_reverse_map(*o); });
}

}  // namespace gapwise::cli
