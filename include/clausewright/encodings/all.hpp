// clausewright: the list of encodings. Adding one: its file (with its
// NAME_encoding descriptor, encodings/descriptor.hpp), an #include here and
// its name in CLAUSEWRIGHT_ENCODINGS, in the order of the method table.
#pragma once

#include "adder.hpp"
#include "bdd.hpp"
#include "bimander.hpp"
#include "binomial.hpp"
#include "bitwise.hpp"
#include "cardinality_network.hpp"
#include "commander.hpp"
#include "generalized_totalizer.hpp"
#include "group_generalized_totalizer.hpp"
#include "group_mdd.hpp"
#include "group_sequential_weight_counter.hpp"
#include "ladder.hpp"
#include "modulo_totalizer.hpp"
#include "pairwise.hpp"
#include "product.hpp"
#include "sequential_counter.hpp"
#include "sequential_weight_counter.hpp"
#include "totalizer.hpp"

// X(name) for every method: method_id::name, name##_encoding.
// NOLINTNEXTLINE(bugprone-macro-parentheses): the argument is a name, not an expression
#define CLAUSEWRIGHT_ENCODINGS(X)        \
  X(pairwise)                            \
  X(ladder)                              \
  X(bitwise)                             \
  X(commander)                           \
  X(product)                             \
  X(bimander)                            \
  X(sequential_counter)                  \
  X(totalizer)                           \
  X(modulo_totalizer)                    \
  X(cardinality_network)                 \
  X(sorting_network)                     \
  X(binomial)                            \
  X(bdd)                                 \
  X(adder)                               \
  X(generalized_totalizer)               \
  X(sequential_weight_counter)           \
  X(group_mdd)                           \
  X(group_generalized_totalizer)         \
  X(group_reduced_generalized_totalizer) \
  X(group_sequential_weight_counter)
