// clausewright tool: the OPB reader (Pseudo-Boolean Competition input format,
// Roussel & Manquinho).
//
//   * #variable= 4 #constraint= 2          header (a comment line)
//   min: +2 x1 -3 ~x2 ;                     optional objective, minimised
//   +1 x1 +2 x2 x3 >= 2 ;                   x2 x3 is a product of literals
//   [5] +1 x1 +1 x4 <= 1 ;                  soft constraint of weight 5
//
// Variable xN is DIMACS variable N. Each distinct product of literals gets a
// fresh variable after the largest user variable, defined both ways (by the
// handler). The file is read in blocks; only the current constraint is held,
// plus one variable per distinct product. A statement ends with ';' on its
// own line. Every malformed input raises one error with file:line:column and
// what was expected there.
#pragma once

#include <clausewright/model.hpp>

#include "input.hpp"

namespace clausewright::tool {

// Reads the whole file into `handler` (begin, products, objective and
// constraints in file order, end). When the header is missing the file is
// read twice: once to find the largest variable.
void read_opb(byte_source& in, model_handler& handler);

}  // namespace clausewright::tool
