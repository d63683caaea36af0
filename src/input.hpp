// clausewright tool: byte sources the readers take their input from.
//
// Readers pull blocks, never the whole text, and may ask to start again from
// the beginning (a second pass to count before writing to a pipe). Standard
// input, and any path that is not a regular file (a pipe such as
// `<(command)`, a FIFO, a device), is copied to an unlinked temporary file so
// it can be read twice.
//
// char_cursor skips a UTF-8 byte-order mark (EF BB BF) at the very start:
// editors write one, and it is no part of either model format.
#pragma once

#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
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

// Which file a path names: device and inode, compared to refuse an output
// path that is the input itself (through a symbolic or a hard link too).
struct file_identity {
  std::uint64_t device = 0;
  std::uint64_t inode = 0;
  friend bool operator==(const file_identity&, const file_identity&) = default;
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
  // The regular file read (none for a spooled copy: nothing can overwrite it).
  [[nodiscard]] const std::optional<file_identity>& identity() const noexcept { return identity_; }

 private:
  int fd_ = -1;
  std::string name_;
  std::optional<file_identity> identity_;
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

// The characters of a byte source one at a time, read in blocks, with the
// line and column (both from 1) of the next one: what the readers' error
// messages point at.
class char_cursor {
 public:
  static constexpr int end = -1;  // peek() at the end of the input

  explicit char_cursor(byte_source& in, std::size_t block_size = std::size_t{1} << 16)
      : in_(in), block_size_(block_size), buffer_(new char[block_size]) {}

  // The next character as an unsigned byte, or `end`.
  int peek() {
    if (pos_ < size_) return static_cast<unsigned char>(buffer_[pos_]);
    if (at_end_) return end;
    size_ = in_.read(buffer_.get(), block_size_);
    pos_ = 0;
    if (first_block_) {
      first_block_ = false;
      // A byte-order mark is skipped; its bytes count for no column.
      if (size_ >= 3 && buffer_[0] == '\xEF' && buffer_[1] == '\xBB' && buffer_[2] == '\xBF') pos_ = 3;
      if (pos_ == size_) return peek();
    }
    if (size_ == 0) {
      at_end_ = true;
      return end;
    }
    return static_cast<unsigned char>(buffer_[pos_]);
  }
  // Moves past the character peek() returned (not at the end).
  void advance() {
    if (buffer_[pos_] == '\n') {
      ++line_;
      column_ = 1;
    } else {
      ++column_;
    }
    ++pos_;
  }
  [[nodiscard]] std::uint64_t line() const noexcept { return line_; }
  [[nodiscard]] std::uint64_t column() const noexcept { return column_; }
  [[nodiscard]] const std::string& name() const { return in_.name(); }

 private:
  byte_source& in_;
  std::size_t block_size_;
  std::unique_ptr<char[]> buffer_;  // not zeroed: it is filled before it is read
  std::size_t pos_ = 0;
  std::size_t size_ = 0;
  bool at_end_ = false;
  bool first_block_ = true;
  std::uint64_t line_ = 1;
  std::uint64_t column_ = 1;
};

}  // namespace clausewright::tool
