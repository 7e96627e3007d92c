#include "io/compare_paths_report.hpp"

#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "hamiltonian/spin_flip_sector.hpp"
#include "io/hdf5_output.hpp"
#include "io/infinite_tts.hpp"
#include "io/json_summary.hpp"
#include "io/open_path_output.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"

namespace gapwise {

namespace {

/// The one table behind the text and the CSV.
TextTable compare_table(const ComparePathsReport& r) {
  const ShapeComparison& c = *r.comparison;
  std::vector<std::string> cols{"path", "duration_ns", "end_ns", "p_ground", fmt::format("TTS{:g}_ns", 100 * r.target_probability),
                                "largest leak (s)", "leak", "level0_end"};
  if (r.open) {
    cols.push_back("p_bath");
    cols.push_back(fmt::format("TTS{:g}_bath_ns", 100 * r.target_probability));
  }
  TextTable t(cols);
  for (std::size_t j = 0; j < c.durations_ns.size(); ++j)
    for (std::size_t i = 0; i < c.names.size(); ++i) {
      const ShapeRun& x = c.at(i, j);
      std::vector<std::string> row{x.name, fmt_num(x.duration_ns, 8), fmt_num(x.end_time_ns, 12),
                                   fmt_num(x.ground_probability, 8), tts_text(x.tts.tts_ns, 6),
                                   x.leak.drop > 0 ? fmt::format("{:.3f}-{:.3f}", x.leak.s_from, x.leak.s_to) : "-",
                                   fmt_num(x.leak.drop, 4), fmt_num(x.leak.final_ground_level, 6)};
      if (r.open) {
        row.push_back(fmt_num(r.open->at(i, j).open.ground_probability, 8));
        row.push_back(tts_text(r.open->at(i, j).open_tts.tts_ns, 6));
      }
      t.add(row);
    }
  return t;
}

}  // namespace

std::string compare_paths_report_text(const ComparePathsReport& r) {
  const ShapeComparison& c = *r.comparison;
  std::string text;
  text += fmt::format("problem  {}: {} qubits; paths compared at equal total duration\n", terminal_text(r.problem_file),
                      r.problem->qubits);
  text += fmt::format("levels   populations of the lowest {} instantaneous levels ({})\n", r.levels,
                      describe_sector(c.sector));
  if (r.local_adiabatic) {
    const LocalAdiabaticSchedule& g = *r.local_adiabatic;
    text += fmt::format("gap      {:.6g} GHz at s* = {:.6g} ({}); local adiabatic I = {:.6g} ns\n", g.report.gap_ghz,
                        g.report.s_star, g.report.definition, g.path.integral_ns);
  }
  text += "\n" + compare_table(r).render();
  text += "\nleak: the largest drop of the instantaneous ground level's population between two observations,\n"
          "and where along s it happened; level0_end: that population at the end (= p_ground when A(1) = 0).\n";
  if (r.open) text += open_path_text(*r.open, *r.bath);
  return text;
}

std::string compare_paths_report_csv(const ComparePathsReport& r) { return compare_table(r).csv(); }

std::string compare_paths_report_json(const ComparePathsReport& r) {
  const ShapeComparison& c = *r.comparison;
  toml::table j;
  put(j, "problem", r.problem_file);
  put(j, "qubits", static_cast<long long>(r.problem->qubits));
  put(j, "target_probability", r.target_probability);
  toml::array runs;
  for (std::size_t i = 0; i < c.names.size(); ++i)
    for (std::size_t d = 0; d < c.durations_ns.size(); ++d) {
      const ShapeRun& x = c.at(i, d);
      toml::table e;
      put(e, "path", x.name);
      put(e, "duration_ns", x.duration_ns);
      put(e, "end_time_ns", x.end_time_ns);
      put(e, "ground_probability", x.ground_probability);
      put_tts(e, "tts_ns", x.tts.tts_ns);
      put(e, "largest_leak", x.leak.drop);
      put(e, "largest_leak_s_from", x.leak.s_from);
      put(e, "largest_leak_s_to", x.leak.s_to);
      runs.push_back(std::move(e));
    }
  j.insert_or_assign("runs", std::move(runs));
  if (r.open) j.insert_or_assign("open_system", open_path_json(*r.open, *r.bath));
  return to_json(j) + "\n";
}

void write_compare_paths_result(const std::string& path, const ComparePathsReport& r, const std::string& command_line) {
  const ShapeComparison& c = *r.comparison;
  Hdf5Output h5(path, {"gapwise-compare-paths", 1});
  std::vector<std::string> inputs{r.problem_file};
  for (const auto& f : r.schedule_files) inputs.push_back(f);
  write_provenance(h5, command_line, inputs);
  h5.write_strings("/compare/paths", c.names, "the compared paths (rows of the matrices)");
  h5.write("/compare/durations_ns", c.durations_ns, "ns");
  std::vector<double> pg, tts, end;
  for (const auto& x : c.runs) {
    pg.push_back(x.ground_probability);
    tts.push_back(stored_tts(x.tts.tts_ns));
    end.push_back(x.end_time_ns);
  }
  const std::size_t ni = c.names.size(), nj = c.durations_ns.size();
  h5.write_matrix("/compare/ground_probability", pg, ni, nj, "1", {"/compare/paths", "/compare/durations_ns"});
  h5.write_matrix("/compare/tts_ns", tts, ni, nj, tts_meaning("ns"), {"/compare/paths", "/compare/durations_ns"});
  h5.write_matrix("/compare/end_time_ns", end, ni, nj, "ns", {"/compare/paths", "/compare/durations_ns"});
  h5.attribute("/compare", "target_probability", r.target_probability);
  h5.attribute("/compare", "level_sector", sector_name(c.sector));
  if (r.open) write_open_path_hdf5(h5, *r.open, *r.bath);
  const int levels = r.levels;
  for (std::size_t i = 0; i < ni; ++i) {
    // Each path's waypoints (fractions of the duration), so the file says what ran.
    std::vector<double> wt, ws;
    // The scaled path is kept in a variable: a range-for over points() of the
    // temporary would read it after its lifetime ended (found by ASan).
    const AnnealPath unit = (*r.candidates)[i].schedule.shape.scaled_to(1.0);
    for (const auto& w : unit.points()) {
      wt.push_back(w.t_ns);
      ws.push_back(w.s);
    }
    h5.write(fmt::format("/compare/path_{}/waypoint_time_fraction", i), wt, "1");
    h5.write(fmt::format("/compare/path_{}/waypoint_s", i), ws, "1");
    h5.attribute(fmt::format("/compare/path_{}", i), "name", c.names[i]);
    for (std::size_t j = 0; j < nj; ++j) {
      const ShapeRun& x = c.at(i, j);
      const std::string g = fmt::format("/compare/path_{}/duration_{}", i, j);
      std::vector<double> tt, ss, e, pop, deg, resolved;
      for (const auto& row : x.populations) {
        tt.push_back(row.t_ns);
        ss.push_back(row.s);
        for (int l = 0; l < levels; ++l) {
          // A level group that runs past the computed levels is unresolved (NaN in
          // memory); files get NaN there (nan_meaning) and the mask level_resolved.
          const double en = row.levels.energies_ghz[static_cast<std::size_t>(l)];
          const double po = row.levels.populations[static_cast<std::size_t>(l)];
          const bool ok = std::isfinite(en) && std::isfinite(po);
          e.push_back(ok ? en : std::numeric_limits<double>::quiet_NaN());
          pop.push_back(ok ? po : std::numeric_limits<double>::quiet_NaN());
          deg.push_back(row.levels.degeneracy[static_cast<std::size_t>(l)]);
          resolved.push_back(ok ? 1.0 : 0.0);
        }
      }
      h5.write(g + "/t", tt, "ns");
      h5.write(g + "/s", ss, "1");
      const std::size_t nl = static_cast<std::size_t>(levels);
      const std::vector<std::string> axes{g + "/t", h5.level_axis(g, nl)};
      const std::string unresolved = "the level group runs past the levels computed (level_resolved 0)";
      h5.write_matrix(g + "/level_energy", e, tt.size(), nl, not_applicable("GHz", unresolved), axes);
      h5.write_matrix(g + "/level_population", pop, tt.size(), nl, not_applicable("1", unresolved), axes);
      h5.write_matrix(g + "/level_degeneracy", deg, tt.size(), nl, "1", axes);
      h5.write_matrix(g + "/level_resolved", resolved, tt.size(), nl,
                      DataMeaning("1").flagged({0, 1}, "unresolved resolved"), axes);
      h5.attribute(g, "duration_ns", x.duration_ns);
      h5.attribute(g, "ground_probability", x.ground_probability);
      h5.attribute(g, "norm_drift", x.norm_drift);
    }
  }
  h5.commit();
}

}  // namespace gapwise
