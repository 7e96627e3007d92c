#pragma once
// The diagnosis as a readable ranked report, as JSON, and as an HDF5 file.
// Layout of the HDF5 file and the meaning of every field: user guide,
// section "diagnose".
//
//   Diagnosis d = diagnose_anneal(problem, schedule, options);
//   std::cout << diagnosis_report_text(d, context);
//   std::cout << to_json(diagnosis_json(d, context)) << "\n";
//   write_diagnosis_hdf5(d, context, "why.h5");
#include <functional>
#include <string>

#include "io/hdf5_output.hpp"

#include "io/json_summary.hpp"
#include "studies/loss_diagnosis.hpp"

namespace gapwise {

/// What the report says about the inputs.
struct DiagnosisContext {
  std::string problem_file, schedule_file, command_line;
  int qubits = 0;
  std::string schedule_description;
};

std::string diagnosis_report_text(const Diagnosis& d, const DiagnosisContext& c);
toml::table diagnosis_json(const Diagnosis& d, const DiagnosisContext& c);
/// Atomic (temporary file renamed on success), with provenance. `extra`, when
/// given, adds groups of its own (e.g. diagnose --bath's /thermal) before commit.
void write_diagnosis_hdf5(const Diagnosis& d, const DiagnosisContext& c, const std::string& path,
                          const std::function<void(Hdf5Output&)>& extra = {});

}  // namespace gapwise
