// clausewright: compile at-most-one, cardinality and weighted-sum constraints
// into CNF. The umbrella header; each part is also usable on its own.
#pragma once

#include "config.hpp"
#include "constraint.hpp"
#include "dimacs.hpp"
#include "encoder.hpp"
#include "error.hpp"
#include "io.hpp"
#include "literal.hpp"
#include "methods.hpp"
#include "pool.hpp"
#include "predict.hpp"
#include "select.hpp"
#include "sink.hpp"
