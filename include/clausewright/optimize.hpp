// clausewright: the optimiser.
//
// The optimiser (search/minimize.hpp) combines a core-guided lower bound, an
// optional linear relaxation, large-neighbourhood improvement and
// solution-improving proof attempts by default; linear (SAT-UNSAT from the
// top), binary and core-guided search are there by option. A time limit ends
// the search with the best solution found so far ("satisfiable") and the
// proved lower bound.
//
// The objective (objective.hpp), its bounds (objective_bound.hpp) and soft
// constraints (soft.hpp) are in their own files, included here.
#pragma once

#include <algorithm>
#include <array>
#include <chrono>
#include <cstdint>
#include <functional>
#include <initializer_list>
#include <map>
#include <memory>
#include <numeric>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "constraint.hpp"
#include "encoder.hpp"
#include "encodings/adder.hpp"
#include "encodings/bdd.hpp"
#include "encodings/common.hpp"
#include "encodings/generalized_totalizer.hpp"
#include "encodings/sequential_counter.hpp"
#include "encodings/sequential_weight_counter.hpp"
#include "encodings/totalizer.hpp"
#include "error.hpp"
#include "literal.hpp"
#include "methods.hpp"
#include "pipeline.hpp"
#include "pool.hpp"
#include "select.hpp"
#include "sink.hpp"
#include "solver.hpp"

#include "objective.hpp"
#include "objective_bound.hpp"
#include "soft.hpp"

// --- the optimiser ----------------------------------------------------------
// The search (its options and result, the strategies) lives in search/.
#include "search/options.hpp"
#include "search/run.hpp"
#include "search/core_guided.hpp"
#include "search/neighbourhood.hpp"
#include "search/minimize.hpp"
