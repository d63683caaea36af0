// clausewright: byte outputs and a buffered text writer for the file formats.
//
// Integers are formatted with std::to_chars straight into a large buffer that
// is handed to the output in big blocks: no iostream formatting per literal.
#pragma once

#include <fcntl.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <condition_variable>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <exception>
#include <filesystem>
#include <memory>
#include <mutex>
#include <ostream>
#include <random>
#include <string>
#include <string_view>
#include <thread>
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

// Hands the bytes to a thread of its own that writes them to `out`, so that
// formatting and the write system calls (the kernel's copy into the page
// cache) run side by side on two cores. The bytes go in blocks of
// `block_size`, at most `blocks` of them in flight: memory stays
// blocks * block_size. finish() waits until everything is written and
// rethrows the first error of the writing thread (later writes rethrow it
// too); patch() finishes first. Destroyed without finish(), it drops what is
// still pending: a failure path, where the caller discards the output.
class threaded_output final : public byte_output {
 public:
  explicit threaded_output(byte_output& out, std::size_t block_size = std::size_t{1} << 20, std::size_t blocks = 4)
      : out_(out),
        block_size_(std::max<std::size_t>(block_size, 1)),
        count_(std::max<std::size_t>(blocks, 2)),
        storage_(new char[block_size_ * count_]),
        sizes_(count_, 0),
        thread_([this] { run(); }) {}
  threaded_output(const threaded_output&) = delete;
  threaded_output& operator=(const threaded_output&) = delete;
  ~threaded_output() override {
    {
      const std::lock_guard lock(mutex_);
      stopping_ = true;
    }
    changed_.notify_all();
    thread_.join();
  }

  void write(const char* data, std::size_t size) override {
    while (size > 0) {
      if (!holding_) acquire();
      const std::size_t n = std::min(size, block_size_ - fill_);
      std::memcpy(block(submitted_ % count_) + fill_, data, n);
      fill_ += n;
      data += n;
      size -= n;
      if (fill_ == block_size_) submit();
    }
  }
  [[nodiscard]] bool can_patch() const override { return out_.can_patch(); }
  void patch(std::uint64_t offset, const char* data, std::size_t size) override {
    finish();
    out_.patch(offset, data, size);
  }
  // Everything handed over so far is written when this returns.
  void finish() {
    if (holding_ && fill_ != 0) submit();
    std::unique_lock lock(mutex_);
    changed_.wait(lock, [this] { return written_ == submitted_; });
    if (failure_) std::rethrow_exception(failure_);
  }

 private:
  char* block(std::size_t index) noexcept { return storage_.get() + index * block_size_; }

  // Waits until the next block in the ring is free.
  void acquire() {
    std::unique_lock lock(mutex_);
    changed_.wait(lock, [this] { return submitted_ - written_ < count_ || failure_; });
    if (failure_) std::rethrow_exception(failure_);
    holding_ = true;
    fill_ = 0;
  }
  void submit() {
    {
      const std::lock_guard lock(mutex_);
      sizes_[submitted_ % count_] = fill_;
      ++submitted_;
    }
    holding_ = false;
    fill_ = 0;
    changed_.notify_all();
  }
  void run() {
    std::unique_lock lock(mutex_);
    for (;;) {
      changed_.wait(lock, [this] { return stopping_ || written_ < submitted_; });
      if (stopping_) return;
      const std::size_t index = written_ % count_;
      const std::size_t size = sizes_[index];
      const bool skip = failure_ != nullptr;
      lock.unlock();
      std::exception_ptr failed;
      if (!skip) {
        try {
          out_.write(block(index), size);
        } catch (...) {
          failed = std::current_exception();
        }
      }
      lock.lock();
      if (failed && !failure_) failure_ = failed;
      ++written_;
      changed_.notify_all();
    }
  }

  byte_output& out_;
  std::size_t block_size_;
  std::size_t count_;
  std::unique_ptr<char[]> storage_;  // count_ blocks, used in turn
  std::vector<std::size_t> sizes_;   // bytes in each submitted block
  // Blocks handed over and blocks written; the producer fills block
  // submitted_ % count_ while it holds it.
  std::size_t submitted_ = 0;
  std::size_t written_ = 0;
  bool holding_ = false;
  std::size_t fill_ = 0;
  bool stopping_ = false;
  std::exception_ptr failure_;
  std::mutex mutex_;
  std::condition_variable changed_;
  std::thread thread_;  // last: it starts once the rest is built
};

inline constexpr char digit_pairs[] =
    "00010203040506070809101112131415161718192021222324252627282930313233343536373839"
    "40414243444546474849505152535455565758596061626364656667686970717273747576777879"
    "8081828384858687888990919293949596979899";

// Decimal digits of u (1 for 0).
[[nodiscard]] constexpr unsigned decimal_digits(std::uint32_t u) noexcept {
  unsigned n = 1;
  for (;;) {
    if (u < 10) return n;
    if (u < 100) return n + 1;
    if (u < 1000) return n + 2;
    if (u < 10000) return n + 3;
    u /= 10000;
    n += 4;
  }
}

// Writes `value` in decimal at p (at most 11 bytes) and returns the end:
// digit pairs from a table, written back to front into their final place.
inline char* write_decimal(char* p, std::int32_t value) noexcept {
  auto u = static_cast<std::uint32_t>(value);
  if (value < 0) {
    *p++ = '-';
    u = 0U - u;
  }
  char* const end = p + decimal_digits(u);
  char* q = end;
  while (u >= 100) {
    q -= 2;
    std::memcpy(q, digit_pairs + static_cast<std::size_t>(u % 100) * 2, 2);
    u /= 100;
  }
  if (u >= 10)
    std::memcpy(q - 2, digit_pairs + static_cast<std::size_t>(u) * 2, 2);
  else
    q[-1] = static_cast<char>('0' + u);
  return end;
}

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
  void put_int_unchecked(std::int32_t value) noexcept { finish_unchecked(write_decimal(cursor(), value)); }
  // Raw writing after reserve(): the next free byte, and where the caller's
  // unchecked writes ended. A hot loop keeps the pointer in a register
  // instead of updating the writer (char stores alias every member).
  [[nodiscard]] char* cursor() noexcept { return buffer_.data() + used_; }
  void finish_unchecked(const char* end) noexcept { used_ = static_cast<std::size_t>(end - buffer_.data()); }
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
