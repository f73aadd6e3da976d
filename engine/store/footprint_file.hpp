#pragma once
// The /footprint part of the results file (layout in docs/results.md), written by `run` and read
// by `report`. Internal to the store module.
#include <H5Cpp.h>

#include "pipeline/study_record.hpp"

namespace strewn {

void write_footprint(H5::H5File& file, const StudyRecord& record);
/// Fills record.footprint and the site, release and study attributes from /footprint.
void read_footprint(const H5::Group& file, StudyRecord& record);

}  // namespace strewn
