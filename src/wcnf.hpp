// clausewright tool: the WCNF writer is the library's (<clausewright/wcnf.hpp>).
#pragma once

#include <clausewright/wcnf.hpp>

namespace clausewright::tool {
using clausewright::wcnf_style;
using clausewright::wcnf_writer;
}  // namespace clausewright::tool
