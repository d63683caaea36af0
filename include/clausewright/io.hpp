// clausewright: byte outputs and a buffered text writer for the file formats.
//
// Integers are formatted with std::to_chars straight into a large buffer that
// is handed to the output in big blocks: no iostream formatting per literal.
#pragma once

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <condition_variable>
#include <csignal>
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

// The temporary file an atomic_file_output is writing, for a signal handler
// to remove (remove_pending_temporary): a fixed buffer and a flag, the only
// things a handler may touch. One at a time; a path too long for the buffer
// is not registered.
inline char pending_temporary_path[4096] = {};
inline volatile std::sig_atomic_t pending_temporary_set = 0;

// Removes the temporary file being written, if any. Async-signal-safe: a
// handler of SIGINT, SIGTERM or SIGHUP calls it before the signal's default
// action ends the program.
inline void remove_pending_temporary() noexcept {
  if (pending_temporary_set != 0) {
    pending_temporary_set = 0;
    ::unlink(pending_temporary_path);
  }
}

// `path` with every symbolic link along its last component followed (the
// directories may be links too; the kernel follows those): the file a write
// to `path` would reach. A dangling link gives the path it points to, where
// the file is then created.
[[nodiscard]] inline std::string resolve_output_path(const std::string& path) {
  std::string at = path;
  for (int hops = 0;; ++hops) {
    struct stat st {};
    if (::lstat(at.c_str(), &st) != 0 || !S_ISLNK(st.st_mode)) return at;
    if (hops == 40) throw error(error_id::io, "cannot write " + path + ": too many levels of symbolic links");
    std::string link(static_cast<std::size_t>(st.st_size > 0 ? st.st_size : 255) + 1, '\0');
    const ::ssize_t n = ::readlink(at.c_str(), link.data(), link.size());
    if (n < 0) throw error(error_id::io, "cannot follow the symbolic link " + at + ": " + std::strerror(errno));
    link.resize(static_cast<std::size_t>(n));
    if (link.empty() || link.front() != '/') {
      const auto slash = at.rfind('/');
      if (slash != std::string::npos) link.insert(0, at, 0, slash + 1);
    }
    at = std::move(link);
  }
}

// Writes a file so that it never appears half-written and never destroys what
// is not a regular file.
// - A regular file (existing or new) is written to a temporary beside it and
//   renamed into place only on commit(): a failure (or a destructor without
//   commit) removes the temporary. An existing file keeps its permissions
//   (and, as far as allowed, its owner); the temporary is private (0600)
//   until then. A new file gets 0666 less the umask.
// - A symbolic link is followed first: its target is written, the link stays.
// - Anything else that exists (a device such as /dev/null, a FIFO, a socket)
//   is opened and written directly, never replaced: renaming a file over it
//   would destroy it. Such an output cannot be patched, and a failure may
//   leave part of the bytes written there.
// While a temporary exists, its path is registered for
// remove_pending_temporary().
class atomic_file_output final : public fd_output {
 public:
  explicit atomic_file_output(const std::string& target) : fd_output(-1, target), target_(resolve_output_path(target)) {
    struct stat st {};
    const bool exists = ::stat(target_.c_str(), &st) == 0;
    if (exists && !S_ISREG(st.st_mode)) {
      if (S_ISDIR(st.st_mode)) throw error(error_id::io, "cannot write " + name() + ": it is a directory");
      const int fd = ::open(target_.c_str(), O_WRONLY | O_CLOEXEC | O_NOCTTY);
      if (fd < 0) throw error(error_id::io, "cannot open " + name() + " for writing: " + std::strerror(errno));
      set_fd(fd);
      direct_ = true;
      return;
    }
    if (exists) {
      mode_ = st.st_mode & 07777;
      owner_ = st.st_uid;
      group_ = st.st_gid;
      keep_ = true;
    }
    std::random_device entropy;
    for (int attempt = 0; attempt < 16; ++attempt) {
      temporary_ = target_ + ".tmp-" + std::to_string(::getpid()) + "-" + std::to_string(entropy() % 1000000);
      const int fd = ::open(temporary_.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, keep_ ? 0600 : 0666);
      if (fd >= 0) {
        set_fd(fd);
        register_temporary();
        return;
      }
      if (errno != EEXIST) break;
    }
    const int saved = errno;
    temporary_.clear();
    throw error(error_id::io, "cannot create a temporary file beside " + target_ + ": " + std::strerror(saved));
  }
  atomic_file_output(const atomic_file_output&) = delete;
  atomic_file_output& operator=(const atomic_file_output&) = delete;
  ~atomic_file_output() override { discard(); }

  [[nodiscard]] bool can_patch() const override { return !direct_ && fd_output::can_patch(); }

  void commit() {
    if (fd() < 0) throw error(error_id::usage, "output already closed");
    const int fd_to_close = fd();
    set_fd(-1);
    if (direct_) {
      committed_ = true;
      if (::close(fd_to_close) != 0 && errno != EINTR)
        throw error(error_id::io, "closing " + name() + " failed: " + std::strerror(errno));
      return;
    }
    if (keep_) {
      // Best effort for the owner (only root may give a file away); the
      // permissions are set after it, as chown may clear set-id bits.
      if (owner_ != ::geteuid() || group_ != ::getegid()) static_cast<void>(::fchown(fd_to_close, owner_, group_));
      if (::fchmod(fd_to_close, mode_) != 0) {
        const int saved = errno;
        ::close(fd_to_close);
        remove_temporary();
        throw error(error_id::io, "keeping the permissions of " + name() + " failed: " + std::strerror(saved));
      }
    }
    if (::close(fd_to_close) != 0) {
      const int saved = errno;
      remove_temporary();
      throw error(error_id::io, "closing " + name() + " failed: " + std::strerror(saved));
    }
    if (::rename(temporary_.c_str(), target_.c_str()) != 0) {
      const int saved = errno;
      remove_temporary();
      throw error(error_id::io, "renaming the output into " + target_ + " failed: " + std::strerror(saved));
    }
    committed_ = true;
    unregister_temporary();
  }
  void discard() noexcept {
    if (fd() >= 0) {
      ::close(fd());
      set_fd(-1);
    }
    if (!committed_) remove_temporary();
  }
  [[nodiscard]] const std::string& temporary_path() const noexcept { return temporary_; }
  // The file written: the target with its symbolic links followed.
  [[nodiscard]] const std::string& resolved_path() const noexcept { return target_; }
  // True when the target is not a regular file and is written in place.
  [[nodiscard]] bool direct() const noexcept { return direct_; }

 private:
  void register_temporary() noexcept {
    if (temporary_.size() >= sizeof pending_temporary_path) return;
    pending_temporary_set = 0;
    std::memcpy(pending_temporary_path, temporary_.c_str(), temporary_.size() + 1);
    pending_temporary_set = 1;
    registered_ = true;
  }
  void unregister_temporary() noexcept {
    if (registered_) pending_temporary_set = 0;
    registered_ = false;
  }
  void remove_temporary() noexcept {
    if (temporary_.empty()) return;
    ::unlink(temporary_.c_str());
    unregister_temporary();  // after: a signal in between finds nothing to remove
    temporary_.clear();
  }

  std::string target_;
  std::string temporary_;
  bool direct_ = false;
  bool keep_ = false;  // an existing regular file: keep its mode and owner
  ::mode_t mode_ = 0;
  ::uid_t owner_ = 0;
  ::gid_t group_ = 0;
  bool committed_ = false;
  bool registered_ = false;
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
