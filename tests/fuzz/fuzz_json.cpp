// libFuzzer target: the JSON model reader must turn every input into a model
// or one clausewright::error, never a crash, a leak or undefined behaviour.
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include <clausewright/model.hpp>

#include "json_model.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  namespace cw = clausewright;
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  try {
    const cw::model m = cw::tool::parse_json_model(text, "fuzz.json");
    (void)m.check([](std::int32_t v) { return v % 2 == 0; });
    (void)m.objective_value([](std::int32_t v) { return v % 3 == 0; });
    for (std::size_t i = 0; i < m.constraints(); ++i) (void)cw::normalize_view(m.constraint(i));
  } catch (const cw::error&) {
  }
  return 0;
}
