// libFuzzer target: the OPB reader must turn every input into a model or one
// clausewright::error, never a crash, a leak or undefined behaviour.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include <clausewright/model.hpp>

#include "input.hpp"
#include "model_file.hpp"
#include "opb.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  namespace cw = clausewright;
  const std::string_view bytes(reinterpret_cast<const char*>(data), size);
  cw::tool::memory_source in(bytes, "fuzz.opb");
  try {
    cw::model m;
    cw::tool::model_builder builder(m);
    cw::tool::read_opb(in, builder);
    // Evaluate what was read under one assignment, and normalise each
    // constraint (the first step of every encoding).
    (void)m.check([](std::int32_t v) { return v % 2 == 0; });
    (void)m.objective_value([](std::int32_t v) { return v % 3 == 0; });
    for (std::size_t i = 0; i < m.constraints(); ++i) (void)cw::normalize_view(m.constraint(i));
  } catch (const cw::error&) {
  }
  return 0;
}
