#include "io/pause_map_report.hpp"

#include <algorithm>

#include <fmt/format.h>

#include "io/bath_attributes.hpp"
#include "io/hdf5_output.hpp"
#include "io/infinite_tts.hpp"
#include "io/json_summary.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"

namespace gapwise {

namespace {

const char* cost_name(PauseCost cost) { return cost == PauseCost::EqualTotal ? "equal-total" : "added-time"; }

/// How the open system was run: "all levels", "fixed, not checked" or "automatic".
std::string levels_choice(const OpenAnnealResult& first) {
  return first.levels == 0 ? "all levels" : first.levels_fixed ? "fixed, not checked" : "automatic";
}

/// The TTS of the unpaused reference of column j.
double reference_tts(const PauseMap& m, std::size_t j) {
  return time_to_solution(m.reference[j].total_ns, std::clamp(m.reference[j].ground_probability, 0.0, 1.0),
                          m.options.target_probability)
      .tts_ns;
}

std::vector<std::string> grid_head(const PauseMapOptions& mo) {
  std::vector<std::string> head{"pause at s \\ pause ns"};
  for (double d : mo.pause_ns) head.push_back(fmt_num(d, 6));
  return head;
}

}  // namespace

std::string pause_map_report_text(const PauseMapReport& r) {
  const PauseMap& m = *r.map;
  const PauseMapOptions& mo = m.options;
  const PauseMapCell best = best_pause(m);
  const std::size_t bi = best.i, bj = best.j;
  std::string out;
  out += fmt::format("problem   {} ({} qubits); schedule {}\n", terminal_text(r.problem_file), r.problem->qubits,
                     terminal_text(r.schedule_file));
  out += fmt::format("cost      {}\n",
                     mo.cost == PauseCost::EqualTotal
                         ? fmt::format("equal total: every run takes {} ns, the pause eats into the ramp", mo.duration_ns)
                         : fmt::format("added time: the ramp takes {} ns, the run {} ns + pause", mo.duration_ns,
                                       mo.duration_ns));
  out += fmt::format("points    {} simulated, {} read back from {}\n", m.simulated, m.resumed, r.journal_file);
  out += fmt::format("propagators {} (map cells); {} (no-pause references)\n\n", propagator_tally(m.points),
                     propagator_tally(m.reference));
  const std::vector<std::string> head = grid_head(mo);
  TextTable t(head);
  std::vector<std::string> ref{"no pause (same cost)"};
  for (const auto& x : m.reference) ref.push_back(fmt_num(x.ground_probability, 6));
  t.add(ref);
  for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
    std::vector<std::string> row{fmt_num(mo.pause_s[i], 6)};
    for (std::size_t j = 0; j < mo.pause_ns.size(); ++j) row.push_back(fmt_num(m.at(i, j).ground_probability, 6));
    t.add(row);
  }
  out += "ground-state probability p\n" + t.render();
  out += fmt::format("\nbest pause: s = {}, {} ns: p = {:.6f} against {:.6f} without a pause at the same cost ({:+.6f}); "
                     "TTS {} ns against {} ns\n",
                     fmt_num(mo.pause_s[bi], 6), fmt_num(mo.pause_ns[bj], 6), m.at(bi, bj).ground_probability,
                     m.reference[bj].ground_probability, best.gain, tts_text(m.tts_ns(bi, bj), 6),
                     tts_text(reference_tts(m, bj), 6));
  if (r.open) {
    const OpenPauseMap& open = *r.open;
    const std::size_t nj = mo.pause_ns.size();
    out += "\nwith the bath (adiabatic master equation; " + open.bath->summary() + ")\n";
    TextTable tb(head);
    std::vector<std::string> rref{"no pause (same cost)"};
    for (double v : open.reference) rref.push_back(fmt_num(v, 6));
    tb.add(rref);
    for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
      std::vector<std::string> row{fmt_num(mo.pause_s[i], 6)};
      for (std::size_t j = 0; j < nj; ++j) row.push_back(fmt_num(open.p[i * nj + j], 6));
      tb.add(row);
    }
    const PauseMapCell ob = best_pause(open, mo);
    out += "ground-state probability p with the bath\n" + tb.render();
    out += fmt::format("best pause with the bath: s = {}, {} ns: p = {:.6f} against {:.6f} without a pause at the same "
                       "cost ({:+.6f})\n",
                       fmt_num(mo.pause_s[ob.i], 6), fmt_num(mo.pause_ns[ob.j], 6), open.p[ob.i * nj + ob.j],
                       open.reference[ob.j], ob.gain);
  }
  return out;
}

std::string pause_map_report_json(const PauseMapReport& r) {
  const PauseMap& m = *r.map;
  const PauseMapOptions& mo = m.options;
  const PauseMapCell best = best_pause(m);
  toml::table j;
  put(j, "problem_file", r.problem_file);
  put(j, "schedule_file", r.schedule_file);
  put(j, "duration_ns", mo.duration_ns);
  put(j, "cost", std::string(cost_name(mo.cost)));
  put(j, "target", mo.target_probability);
  put(j, "out", r.out);
  put(j, "simulated", static_cast<long long>(m.simulated));
  put(j, "resumed", static_cast<long long>(m.resumed));
  toml::array at, ns, ref, rows;
  for (double v : mo.pause_s) at.push_back(v);
  for (double v : mo.pause_ns) ns.push_back(v);
  for (const auto& x : m.reference) ref.push_back(x.ground_probability);
  for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
    toml::array row;
    for (std::size_t k = 0; k < mo.pause_ns.size(); ++k) row.push_back(m.at(i, k).ground_probability);
    rows.push_back(std::move(row));
  }
  j.insert_or_assign("pause_s", std::move(at));
  j.insert_or_assign("pause_ns", std::move(ns));
  j.insert_or_assign("reference_ground_probability", std::move(ref));
  j.insert_or_assign("ground_probability", std::move(rows));
  toml::array used_rows, used_ref;
  for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
    toml::array row;
    for (std::size_t k = 0; k < mo.pause_ns.size(); ++k) row.push_back(propagators_used({m.at(i, k)}).front());
    used_rows.push_back(std::move(row));
  }
  for (const auto& name : propagators_used(m.reference)) used_ref.push_back(name);
  j.insert_or_assign("propagator_used", std::move(used_rows));
  j.insert_or_assign("reference_propagator_used", std::move(used_ref));
  toml::table b;
  put(b, "pause_s", mo.pause_s[best.i]);
  put(b, "pause_ns", mo.pause_ns[best.j]);
  put(b, "ground_probability", m.at(best.i, best.j).ground_probability);
  put(b, "reference_ground_probability", m.reference[best.j].ground_probability);
  put(b, "gain", m.at(best.i, best.j).ground_probability - m.reference[best.j].ground_probability);
  put_tts(b, "tts_ns", m.tts_ns(best.i, best.j));
  put_tts(b, "reference_tts_ns", reference_tts(m, best.j));
  j.insert_or_assign("best", std::move(b));
  if (r.open) {
    // The same grid with the bath, its best cell, and how the open system was run.
    const OpenPauseMap& open = *r.open;
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
    for (std::size_t i = 0; i < mo.pause_s.size(); ++i) {
      toml::array row;
      for (std::size_t k = 0; k < nj; ++k) row.push_back(open.p[i * nj + k]);
      orows.push_back(std::move(row));
    }
    os.insert_or_assign("ground_probability", std::move(orows));
    os.insert_or_assign("reference_ground_probability", std::move(oref));
    put(os, "method", open.runs.front().propagator);
    put(os, "levels_choice", levels_choice(open.runs.front()));
    long long kmax = 0;
    double trace = 0, mineig = 0;
    for (const auto& x : open.runs) {
      kmax = std::max<long long>(kmax, x.levels);
      trace = std::max(trace, x.stats.max_trace_deviation);
      mineig = std::min(mineig, x.stats.min_eigenvalue);
    }
    put(os, "largest_levels", kmax);
    put(os, "max_trace_deviation", trace);
    put(os, "min_eigenvalue", mineig);
    const PauseMapCell obest = best_pause(open, mo);
    toml::table ob;
    put(ob, "pause_s", mo.pause_s[obest.i]);
    put(ob, "pause_ns", mo.pause_ns[obest.j]);
    put(ob, "ground_probability", open.p[obest.i * nj + obest.j]);
    put(ob, "reference_ground_probability", open.reference[obest.j]);
    put(ob, "gain", obest.gain);
    os.insert_or_assign("best", std::move(ob));
    j.insert_or_assign("open_system", std::move(os));
  }
  return to_json(j) + "\n";
}

void write_pause_map_result(const std::string& path, const PauseMapReport& r, const std::string& command_line) {
  const PauseMap& m = *r.map;
  const PauseMapOptions& mo = m.options;
  Hdf5Output h5(path, {"gapwise-pause-map", 1});
  write_provenance(h5, command_line, {r.problem_file, r.schedule_file});
  std::vector<double> pg, tts, tot, nd;
  for (std::size_t i = 0; i < mo.pause_s.size(); ++i)
    for (std::size_t j = 0; j < mo.pause_ns.size(); ++j) {
      pg.push_back(m.at(i, j).ground_probability);
      tts.push_back(stored_tts(m.tts_ns(i, j)));
      tot.push_back(m.at(i, j).total_ns);
      nd.push_back(m.at(i, j).norm_drift);
    }
  const std::size_t ni = mo.pause_s.size(), nj = mo.pause_ns.size();
  const std::vector<std::string> axes{"/pause_map/pause_s", "/pause_map/pause_ns"};
  h5.write("/pause_map/pause_s", mo.pause_s, "1");
  h5.write("/pause_map/pause_ns", mo.pause_ns, "ns");
  h5.write_matrix("/pause_map/ground_probability", pg, ni, nj, "1", axes);
  h5.write_matrix("/pause_map/tts_ns", tts, ni, nj, tts_meaning("ns"), axes);
  h5.write_matrix("/pause_map/total_ns", tot, ni, nj, "ns", axes);
  h5.write_matrix("/pause_map/norm_drift", nd, ni, nj, "1", axes);
  std::vector<double> rp, rt;
  for (const auto& x : m.reference) { rp.push_back(x.ground_probability); rt.push_back(x.total_ns); }
  h5.write("/pause_map/reference_ground_probability", rp, "1");
  h5.write("/pause_map/reference_total_ns", rt, "ns");
  h5.write_strings("/pause_map/propagator_used", propagators_used(m.points),
                   "the propagator that ran each cell (with --propagator auto: split-auto or frame, chosen by cost); "
                   "row-major over (pause_s, pause_ns), the order of ground_probability's elements");
  h5.write_strings("/pause_map/reference_propagator_used", propagators_used(m.reference),
                   "the propagator that ran each no-pause reference, one per pause_ns");
  h5.attribute("/pause_map", "duration_ns", mo.duration_ns);
  h5.attribute("/pause_map", "cost", cost_name(mo.cost));
  h5.attribute("/pause_map", "target_probability", mo.target_probability);
  h5.attribute("/pause_map", "tolerance", r.tolerance);
  if (r.open) {
    const OpenPauseMap& open = *r.open;
    h5.write_matrix("/pause_map/open_system/ground_probability", open.p, ni, nj, "1", axes);
    h5.write("/pause_map/open_system/reference_ground_probability", open.reference, "1");
    h5.attach_scales("/pause_map/open_system/reference_ground_probability", {"/pause_map/pause_ns"});
    h5.attribute("/pause_map/open_system", "method", open.runs.front().propagator);
    h5.attribute("/pause_map/open_system", "levels_choice", levels_choice(open.runs.front()));
    write_bath_attributes(h5, "/pause_map/open_system", *open.bath);
  }
  h5.commit();
}

}  // namespace gapwise
