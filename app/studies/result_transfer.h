#pragma once
// What a study point's result is, as bytes between the ranks of an MPI job (app/studies/rank_pool.h): every field
// the studies read after the pool, numbers bit for bit. A reader takes the fields in the order the writer put them.
#include <optional>
#include <vector>

#include "analysis/stall.h"
#include "app/cluster/bytes.h"
#include "app/evaluation/case_evaluation.h"
#include "app/studies/faults.h"
#include "app/studies/study_run.h"

namespace linkrise::app {

/// Status, message, outcome, verdict and the values of one point of run_study.
void save_point(ByteWriter& out, const PointResult& point);
PointResult load_point(ByteReader& in);

/// Named metrics with their units (a point whose columns are not known yet).
void save_metrics(ByteWriter& out, const std::vector<MetricValue>& metrics);
std::vector<MetricValue> load_metrics(ByteReader& in);

/// A whole evaluation: status, message, outcome, verdict, metrics, judged margins and wall time.
void save_evaluation(ByteWriter& out, const CaseEvaluation& evaluation);
CaseEvaluation load_evaluation(ByteReader& in);

/// A row of the detection matrix, every field (its link trace included).
void save_row(ByteWriter& out, const DetectionRow& row);
DetectionRow load_row(ByteReader& in);

/// What a scenario's run found about the charging path and a stall, when it found anything.
void save_path(ByteWriter& out, const std::optional<analysis::ChargePath>& path);
std::optional<analysis::ChargePath> load_path(ByteReader& in);
void save_stall(ByteWriter& out, const std::optional<analysis::StallDiagnostic>& stall);
std::optional<analysis::StallDiagnostic> load_stall(ByteReader& in);

}  // namespace linkrise::app
