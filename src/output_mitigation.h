// src/output_mitigation.h — the report's "Mitigation options" section (internal).
#ifndef OVERTONE_INTERNAL_OUTPUT_MITIGATION_H_
#define OVERTONE_INTERNAL_OUTPUT_MITIGATION_H_

#include "output_common.h"
#include "overtone/mitigate.h"

namespace overtone::internal {

// The plant's own figures, the ranked options (the terminal table's columns), the definitions
// of meets and score, and the notes; rendered to Markdown and HTML by src/output_report.cc.
ReportSection MitigationSection(const MitigationResult& result);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_OUTPUT_MITIGATION_H_
