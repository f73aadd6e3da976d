// libFuzzer target over the results-file reader and `report`: any bytes given as a results file
// must end in a report (status 0) or a refusal (status 2, a message), never in a crash, a hang,
// an undefined behaviour or another status. Each input is met as the bytes of a file on disk (a
// damaged file: its seal refuses it). With STREWN_FUZZ_RESEAL=1 each input is sealed first, as a
// crafted file whose author sealed it again, so that the HDF5 library and strewn's checks of the
// layout, shapes and sizes are reached; that mode finds the HDF5 library's own faults (it found a
// global-heap loop that the read time limit of `report` now ends, app/read_deadline.hpp), so it is
// for long runs, not the smoke test. The seed is a real study's file.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include "fuzz_study.hpp"
#include "store/file_seal.hpp"

// Puts the seed (the real file) in each corpus folder named on the command line; libFuzzer reads
// its corpus after this.
extern "C" int LLVMFuzzerInitialize(int* argc, char*** argv) {
  for (int i = 1; i < *argc; ++i)
    if ((*argv)[i][0] != '-' && std::filesystem::is_directory((*argv)[i])) {
      std::ifstream in(strewn::fuzz::study_file(), std::ios::binary);
      std::ofstream(std::string((*argv)[i]) + "/seed-study", std::ios::binary) << in.rdbuf();
    }
  return 0;
}

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  static const bool reseal = std::getenv("STREWN_FUZZ_RESEAL") != nullptr;
  const std::string path = strewn::fuzz::scratch() + "/input.h5";
  std::ofstream(path, std::ios::binary | std::ios::trunc)
      .write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
  if (reseal && size >= strewn::kSealBytes) strewn::seal_file(path);
  const std::string folder = strewn::fuzz::scratch() + "/report";
  std::filesystem::remove_all(folder);  // the outputs of the input before
  const int status = strewn::fuzz::command(
      {"report", path, "--json", "--svg", folder + "/map.svg", "--html", folder + "/page.html",
       "--csv", folder + "/figures.csv", "--geojson", folder + "/zones.geojson", "--impacts"});
  if (status != 0 && status != 2) std::abort();
  return 0;
}
