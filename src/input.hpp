// clausewright tool: byte sources the readers take their input from.
//
// Readers pull blocks, never the whole text, and may ask to start again from
// the beginning (a second pass to count before writing to a pipe). Standard
// input is copied to an unlinked temporary file so it can be read twice.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

namespace clausewright::tool {

class byte_source {
 public:
  virtual ~byte_source() = default;
  // Up to `size` bytes; 0 only at the end.
  virtual std::size_t read(char* data, std::size_t size) = 0;
  virtual void rewind() = 0;
  // The name messages use (the path, or "<stdin>").
  [[nodiscard]] virtual const std::string& name() const = 0;

 protected:
  byte_source() = default;
  byte_source(const byte_source&) = default;
  byte_source& operator=(const byte_source&) = default;
};

// A file, or standard input for "-".
class file_source final : public byte_source {
 public:
  explicit file_source(const std::string& path);
  file_source(const file_source&) = delete;
  file_source& operator=(const file_source&) = delete;
  ~file_source() override;
  std::size_t read(char* data, std::size_t size) override;
  void rewind() override;
  [[nodiscard]] const std::string& name() const override { return name_; }

 private:
  int fd_ = -1;
  std::string name_;
};

// Bytes already in memory (tests and fuzzers).
class memory_source final : public byte_source {
 public:
  memory_source(std::string_view bytes, std::string name) : bytes_(bytes), name_(std::move(name)) {}
  std::size_t read(char* data, std::size_t size) override;
  void rewind() override { position_ = 0; }
  [[nodiscard]] const std::string& name() const override { return name_; }

 private:
  std::string_view bytes_;
  std::size_t position_ = 0;
  std::string name_;
};

}  // namespace clausewright::tool
