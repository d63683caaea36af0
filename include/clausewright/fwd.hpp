// clausewright: forward declarations, for headers that only pass types around.
#pragma once

#include <cstdint>

namespace clausewright {
class literal;
class variable_pool;
class counting_sink;
class cnf_buffer;
class dimacs_writer;
class dynamic_sink;
class byte_output;
class error;
struct term;
struct normalized_constraint;
struct encoding_size;
struct encode_options;
enum class relation : std::uint8_t;
enum class constraint_kind : std::uint8_t;
enum class method_id : std::uint8_t;
enum class selection_policy : std::uint8_t;
template <class Sink>
class encoder;
template <class Sink>
class guarded_sink;
}  // namespace clausewright
