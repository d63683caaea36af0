// clausewright: byte outputs and a buffered text writer for the file formats.
//
// Integers are formatted with std::to_chars straight into a large buffer that
// is handed to the output in big blocks: no iostream formatting per literal.
#pragma once

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <bit>
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
#include <span>
#include <string>
#include <string_view>
#include <thread>
#include <vector>

#include "config.hpp"
#include "error.hpp"

namespace clausewright {

class byte_output;

// Turns the contents of a lent block into the bytes written to `out` (on the
// thread that writes), with `scratch` as its working memory; returns how
// many bytes it wrote. The DIMACS writer's clauses travel so, as numbers,
// and become text on the writing thread.
using block_transform = std::uint64_t (*)(std::span<const char> block, byte_output& out, std::vector<char>& scratch);

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
  // An output that keeps blocks of its own may lend one to the writer that
  // fills it, which saves copying every byte once more: lend() gives a block
  // to fill (empty: this output lends none), and hand_over(n, transform)
  // passes on its first n bytes as write() would (transform null), or what
  // `transform` makes of them; the block is the output's again then.
  // Nothing else is called while a block is lent.
  [[nodiscard]] virtual std::span<char> lend() { return {}; }
  virtual void hand_over(std::size_t /*used*/, block_transform /*transform*/) {}
  // Waits until everything handed over is written (an output that writes on
  // a thread of its own); rethrows the error of a failed write.
  virtual void finish() {}
  // Bytes written by the transforms of the blocks handed over so far (exact
  // after finish()).
  [[nodiscard]] virtual std::uint64_t transformed_bytes() { return 0; }
  // How far the writing thread is behind: blocks handed over and not yet
  // written, and how many blocks there are in all (0 and 0: no such thread).
  [[nodiscard]] virtual std::size_t backlog() { return 0; }
  [[nodiscard]] virtual std::size_t blocks() const { return 0; }

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
  // The writer formats straight into the next block of the ring (or fills
  // it with what a transform turns into bytes on the writing thread).
  [[nodiscard]] std::span<char> lend() override {
    if (holding_ && fill_ != 0) submit();
    if (!holding_) acquire();
    return {block(submitted_ % count_), block_size_};
  }
  void hand_over(std::size_t used, block_transform transform) override {
    fill_ = std::min(used, block_size_);
    if (fill_ != 0) submit(transform);
  }
  [[nodiscard]] std::uint64_t transformed_bytes() override {
    const std::lock_guard lock(mutex_);
    return transformed_;
  }
  [[nodiscard]] std::size_t backlog() override {
    const std::lock_guard lock(mutex_);
    return submitted_ - written_;
  }
  [[nodiscard]] std::size_t blocks() const override { return count_; }
  [[nodiscard]] bool can_patch() const override { return out_.can_patch(); }
  void patch(std::uint64_t offset, const char* data, std::size_t size) override {
    finish();
    out_.patch(offset, data, size);
  }
  // Everything handed over so far is written when this returns.
  void finish() override {
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
  void submit(block_transform transform = nullptr) {
    {
      const std::lock_guard lock(mutex_);
      sizes_[submitted_ % count_] = fill_;
      transforms_[submitted_ % count_] = transform;
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
      const block_transform transform = transforms_[index];
      const bool skip = failure_ != nullptr;
      lock.unlock();
      std::exception_ptr failed;
      std::uint64_t transformed = 0;
      if (!skip) {
        try {
          if (transform != nullptr)
            transformed = transform(std::span<const char>(block(index), size), out_, scratch_);
          else
            out_.write(block(index), size);
        } catch (...) {
          failed = std::current_exception();
        }
      }
      lock.lock();
      transformed_ += transformed;
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
  std::vector<block_transform> transforms_ = std::vector<block_transform>(count_, nullptr);  // per block
  std::vector<char> scratch_;      // the transforms' working memory (writing thread)
  std::uint64_t transformed_ = 0;  // bytes the transforms wrote
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

namespace detail {

// The eight decimal digits of u < 10^8 as the byte values 0..9, the most
// significant digit in the lowest byte (little-endian: the order they are
// printed in). No loop and no table: the halves u / 10^4 and u % 10^4 go
// into the two 32-bit lanes, each lane is split into two 16-bit lanes of two
// digits and each of those into two bytes, all lanes at once. The divisions
// are multiplications: (v * 10486) >> 20 = v / 100 for v < 10^4 and
// (v * 103) >> 10 = v / 10 for v < 100 (checked for every v in
// tests/test_core.cpp); no lane's product reaches the next lane.
[[nodiscard]] constexpr std::uint64_t eight_digits(std::uint32_t u) noexcept {
  std::uint64_t x = (u / 10000) | (static_cast<std::uint64_t>(u % 10000) << 32U);
  const std::uint64_t hundreds = ((x * 10486U) >> 20U) & 0x0000007F0000007FULL;
  x = hundreds | ((x - hundreds * 100U) << 16U);
  const std::uint64_t tens = ((x * 103U) >> 10U) & 0x000F000F000F000FULL;
  return tens | ((x - tens * 10U) << 8U);
}

inline constexpr std::uint64_t ascii_zeros = 0x3030303030303030ULL;

}  // namespace detail

// Writes `value` in decimal at p and returns the end of its digits. It may
// store bytes past that end: the caller must have room for 11 bytes at p
// (the longest value, "-2147483648") whatever the value.
inline char* write_decimal(char* p, std::int32_t value) noexcept {
  auto u = static_cast<std::uint32_t>(value);
  if (value < 0) {
    *p++ = '-';
    u = 0U - u;
  }
  if constexpr (std::endian::native == std::endian::little) {
    if (u < 100000000U) {
      if (u == 0) {
        *p = '0';
        return p + 1;
      }
      // Leading zero digits are the low zero bytes; shifting them out leaves
      // the digits at the start of the eight bytes stored.
      const std::uint64_t digits = detail::eight_digits(u);
      const auto leading = static_cast<unsigned>(std::countr_zero(digits)) / 8U;
      const std::uint64_t text = (digits + detail::ascii_zeros) >> (8U * leading);
      std::memcpy(p, &text, 8);
      return p + 8 - leading;
    }
    const std::uint32_t head = u / 100000000U;  // 1..42
    if (head >= 10) {
      std::memcpy(p, digit_pairs + static_cast<std::size_t>(head) * 2, 2);
      p += 2;
    } else {
      *p++ = static_cast<char>('0' + head);
    }
    const std::uint64_t text = detail::eight_digits(u % 100000000U) + detail::ascii_zeros;
    std::memcpy(p, &text, 8);
    return p + 8;
  } else {
    // Digit pairs from a table, written back to front into their final place.
    unsigned n = 1;
    for (std::uint32_t rest = u; rest >= 10; rest /= 10) ++n;
    char* const end = p + n;
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
}

// Buffered text writer: collects bytes and hands them to the output in
// blocks: blocks the output lends (threaded_output), so that the bytes are
// formatted where they are written from, or else a buffer of its own of
// `capacity` bytes.
class text_writer {
 public:
  static constexpr std::size_t default_capacity = std::size_t{1} << 20;
  // A lent block smaller than this is given back and the writer's own
  // buffer used: callers reserve up to a few dozen bytes at once.
  static constexpr std::size_t smallest_lent_block = 256;

  explicit text_writer(byte_output& out, std::size_t capacity = default_capacity)
      : out_(out), capacity_(capacity + 64) {}
  text_writer(const text_writer&) = delete;
  text_writer& operator=(const text_writer&) = delete;
  ~text_writer() = default;  // does not flush: an unflushed writer means failure

  void put(char c) {
    reserve(1);
    data_[used_++] = c;
  }
  void put(std::string_view s) {
    while (!s.empty()) {
      if (used_ == size_) refill();
      const std::size_t n = std::min(s.size(), size_ - used_);
      std::memcpy(data_ + used_, s.data(), n);
      used_ += n;
      s.remove_prefix(n);
    }
  }
  template <class Int>
  void put_int(Int value) {
    reserve(24);
    const auto result = std::to_chars(data_ + used_, data_ + size_, value);
    used_ = static_cast<std::size_t>(result.ptr - data_);
  }
  // Room for `n` more bytes without a bounds check per byte: callers that
  // write a whole clause reserve once. The room may stay below n when n is
  // more than a whole block (callers then write piece by piece).
  void reserve(std::size_t n) {
    if (size_ - used_ < n) refill();
  }
  // Unchecked writes after reserve().
  void put_unchecked(char c) noexcept { data_[used_++] = c; }
  void put_int_unchecked(std::int32_t value) noexcept { finish_unchecked(write_decimal(cursor(), value)); }
  // Raw writing after reserve(): the next free byte, and where the caller's
  // unchecked writes ended. A hot loop keeps the pointer in a register
  // instead of updating the writer (char stores alias every member).
  [[nodiscard]] char* cursor() noexcept { return data_ + used_; }
  void finish_unchecked(const char* end) noexcept { used_ = static_cast<std::size_t>(end - data_); }
  [[nodiscard]] std::size_t room() const noexcept { return size_ - used_; }

  // Hands everything written so far to the output.
  void flush() {
    if (lent_) {
      lent_ = false;
      data_ = nullptr;
      size_ = 0;
      out_.hand_over(used_, nullptr);
    } else if (used_ != 0) {
      out_.write(data_, used_);
    }
    written_ += used_;
    used_ = 0;
  }
  // Bytes handed to the output plus bytes still buffered.
  [[nodiscard]] std::uint64_t position() const noexcept { return written_ + used_; }
  [[nodiscard]] byte_output& output() noexcept { return out_; }

 private:
  // Flushes and takes the next block: a lent one, else the own buffer.
  void refill() {
    flush();
    const std::span<char> block = out_.lend();
    if (block.size() >= smallest_lent_block) {
      data_ = block.data();
      size_ = block.size();
      lent_ = true;
      return;
    }
    if (!block.empty()) out_.hand_over(0, nullptr);
    if (own_.empty()) own_.resize(capacity_);
    data_ = own_.data();
    size_ = own_.size();
  }

  byte_output& out_;
  std::size_t capacity_;
  std::vector<char> own_;  // allocated when the output lends no blocks
  char* data_ = nullptr;   // the block being filled: lent or own_
  std::size_t size_ = 0;
  std::size_t used_ = 0;
  bool lent_ = false;
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
