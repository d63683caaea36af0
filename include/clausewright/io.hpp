// clausewright: byte outputs and a buffered text writer for the file formats.
//
// Integers are formatted with std::to_chars straight into a large buffer that
// is handed to the output in big blocks: no iostream formatting per literal.
#pragma once

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <charconv>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <ostream>
#include <random>
#include <string>
#include <string_view>
#include <vector>

#include "config.hpp"
#include "error.hpp"

namespace clausewright {

// Where bytes go. patch() overwrites bytes already written, for outputs that
// can seek back (files); the DIMACS header is written last that way.
class byte_output {
 public:
  virtual ~byte_output() = default;
  virtual void write(const char* data, std::size_t size) = 0;
  [[nodiscard]] virtual bool can_patch() const { return false; }
  virtual void patch(std::uint64_t /*offset*/, const char* /*data*/, std::size_t /*size*/) {
    throw error(error_id::usage, "this output cannot be patched");
  }

 protected:
  byte_output() = default;
  byte_output(const byte_output&) = default;
  byte_output& operator=(const byte_output&) = default;
};

class ostream_output final : public byte_output {
 public:
  explicit ostream_output(std::ostream& os) : os_(os) {}
  void write(const char* data, std::size_t size) override {
    os_.write(data, static_cast<std::streamsize>(size));
    if (!os_) throw error(error_id::io, "writing to the output stream failed");
  }

 private:
  std::ostream& os_;
};

// A POSIX file descriptor (a file, a pipe, standard output). Does not own it.
class fd_output : public byte_output {
 public:
  explicit fd_output(int fd, std::string name = "output") : fd_(fd), name_(std::move(name)) {}
  void write(const char* data, std::size_t size) override {
    while (size > 0) {
      const ::ssize_t n = ::write(fd_, data, size);
      if (n < 0) {
        if (errno == EINTR) continue;
        throw error(error_id::io, "writing " + name_ + " failed: " + std::strerror(errno));
      }
      data += n;
      size -= static_cast<std::size_t>(n);
    }
  }
  [[nodiscard]] bool can_patch() const override { return ::lseek(fd_, 0, SEEK_CUR) >= 0; }
  void patch(std::uint64_t offset, const char* data, std::size_t size) override {
    while (size > 0) {
      const ::ssize_t n = ::pwrite(fd_, data, size, static_cast<::off_t>(offset));
      if (n < 0) {
        if (errno == EINTR) continue;
        throw error(error_id::io, "writing " + name_ + " failed: " + std::strerror(errno));
      }
      data += n;
      size -= static_cast<std::size_t>(n);
      offset += static_cast<std::uint64_t>(n);
    }
  }
  [[nodiscard]] int fd() const noexcept { return fd_; }
  [[nodiscard]] const std::string& name() const noexcept { return name_; }

 protected:
  void set_fd(int fd) noexcept { fd_ = fd; }

 private:
  int fd_;
  std::string name_;
};

// Writes to a temporary file beside `target` and renames it into place only on
// commit(): a failure (or a destructor without commit) removes the temporary,
// so a half-written output file never appears under the target name.
class atomic_file_output final : public fd_output {
 public:
  explicit atomic_file_output(const std::string& target) : fd_output(-1, target), target_(target) {
    std::random_device entropy;
    for (int attempt = 0; attempt < 16; ++attempt) {
      temporary_ = target_ + ".tmp-" + std::to_string(::getpid()) + "-" + std::to_string(entropy() % 1000000);
      const int fd = ::open(temporary_.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0644);
      if (fd >= 0) {
        set_fd(fd);
        return;
      }
      if (errno != EEXIST) break;
    }
    throw error(error_id::io, "cannot create a temporary file beside " + target_ + ": " + std::strerror(errno));
  }
  atomic_file_output(const atomic_file_output&) = delete;
  atomic_file_output& operator=(const atomic_file_output&) = delete;
  ~atomic_file_output() override { discard(); }

  void commit() {
    if (fd() < 0) throw error(error_id::usage, "output already closed");
    const int fd_to_close = fd();
    set_fd(-1);
    if (::close(fd_to_close) != 0) {
      ::unlink(temporary_.c_str());
      throw error(error_id::io, "closing " + target_ + " failed: " + std::strerror(errno));
    }
    if (::rename(temporary_.c_str(), target_.c_str()) != 0) {
      const int saved = errno;
      ::unlink(temporary_.c_str());
      throw error(error_id::io, "renaming the output into " + target_ + " failed: " + std::strerror(saved));
    }
    committed_ = true;
  }
  void discard() noexcept {
    if (fd() >= 0) {
      ::close(fd());
      set_fd(-1);
    }
    if (!committed_ && !temporary_.empty()) {
      ::unlink(temporary_.c_str());
      temporary_.clear();
    }
  }
  [[nodiscard]] const std::string& temporary_path() const noexcept { return temporary_; }

 private:
  std::string target_;
  std::string temporary_;
  bool committed_ = false;
};

inline constexpr char digit_pairs[] =
    "00010203040506070809101112131415161718192021222324252627282930313233343536373839"
    "40414243444546474849505152535455565758596061626364656667686970717273747576777879"
    "8081828384858687888990919293949596979899";

// Buffered text writer: collects bytes and flushes in blocks of `capacity`.
class text_writer {
 public:
  static constexpr std::size_t default_capacity = std::size_t{1} << 20;

  explicit text_writer(byte_output& out, std::size_t capacity = default_capacity) : out_(out), buffer_(capacity + 64) {}
  text_writer(const text_writer&) = delete;
  text_writer& operator=(const text_writer&) = delete;
  ~text_writer() = default;  // does not flush: an unflushed writer means failure

  void put(char c) {
    reserve(1);
    buffer_[used_++] = c;
  }
  void put(std::string_view s) {
    if (s.size() > buffer_.size() - used_) {
      flush();
      if (s.size() > buffer_.size()) {
        out_.write(s.data(), s.size());
        written_ += s.size();
        return;
      }
    }
    std::memcpy(buffer_.data() + used_, s.data(), s.size());
    used_ += s.size();
  }
  template <class Int>
  void put_int(Int value) {
    reserve(24);
    const auto result = std::to_chars(buffer_.data() + used_, buffer_.data() + buffer_.size(), value);
    used_ = static_cast<std::size_t>(result.ptr - buffer_.data());
  }
  // Room for `n` more bytes without a bounds check per byte: callers that
  // write a whole clause reserve once.
  void reserve(std::size_t n) {
    if (buffer_.size() - used_ < n) flush();
  }
  // Unchecked writes after reserve().
  void put_unchecked(char c) noexcept { buffer_[used_++] = c; }
  // Digit pairs from a table, written back to front (as fmt's format_decimal).
  void put_int_unchecked(std::int32_t value) noexcept {
    char* p = buffer_.data() + used_;
    std::uint32_t u = static_cast<std::uint32_t>(value);
    if (value < 0) {
      *p++ = '-';
      u = 0U - u;
    }
    char digits[10];
    char* end = digits + sizeof digits;
    char* q = end;
    while (u >= 100) {
      q -= 2;
      std::memcpy(q, digit_pairs + static_cast<std::size_t>(u % 100) * 2, 2);
      u /= 100;
    }
    if (u >= 10) {
      q -= 2;
      std::memcpy(q, digit_pairs + static_cast<std::size_t>(u) * 2, 2);
    } else {
      *--q = static_cast<char>('0' + u);
    }
    const auto length = static_cast<std::size_t>(end - q);
    std::memcpy(p, q, length);
    used_ = static_cast<std::size_t>(p + length - buffer_.data());
  }
  [[nodiscard]] std::size_t room() const noexcept { return buffer_.size() - used_; }

  void flush() {
    if (used_ == 0) return;
    out_.write(buffer_.data(), used_);
    written_ += used_;
    used_ = 0;
  }
  // Bytes handed to the output plus bytes still buffered.
  [[nodiscard]] std::uint64_t position() const noexcept { return written_ + used_; }
  [[nodiscard]] byte_output& output() noexcept { return out_; }

 private:
  byte_output& out_;
  std::vector<char> buffer_;
  std::size_t used_ = 0;
  std::uint64_t written_ = 0;
};

// Number of decimal characters of a literal, including its sign.
[[nodiscard]] constexpr std::uint64_t decimal_width(std::int64_t v) noexcept {
  std::uint64_t width = v < 0 ? 1 : 0;
  std::uint64_t magnitude = v < 0 ? static_cast<std::uint64_t>(-(v + 1)) + 1 : static_cast<std::uint64_t>(v);
  do {
    ++width;
    magnitude /= 10;
  } while (magnitude != 0);
  return width;
}

}  // namespace clausewright
