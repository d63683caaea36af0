// clausewright: compile at-most-one, cardinality and weighted-sum constraints
// into CNF. The umbrella header; each part is also usable on its own.
// Everything here is header-only; the embedded CaDiCaL solver is in
// <clausewright/cadical.hpp> (target clausewright::cadical), which links
// CaDiCaL.
#pragma once

#include "config.hpp"
#include "constraint.hpp"
#include "dimacs.hpp"
#include "encoder.hpp"
#include "error.hpp"
#include "io.hpp"
#include "literal.hpp"
#include "methods.hpp"
#include "model.hpp"
#include "optimize.hpp"
#include "pipeline.hpp"
#include "pool.hpp"
#include "predict.hpp"
#include "select.hpp"
#include "sink.hpp"
#include "solver.hpp"
#include "wcnf.hpp"
