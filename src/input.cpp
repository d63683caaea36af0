#include "input.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <vector>

#include <clausewright/error.hpp>

namespace clausewright::tool {

namespace {

[[noreturn]] void fail(const std::string& what) { throw error(error_id::io, what + ": " + std::strerror(errno)); }

// Copies what `from` delivers (standard input, a pipe, a FIFO, a device)
// into an unlinked temporary file, which can be read again.
int spool(int from, const std::string& name) {
  const char* dir = std::getenv("TMPDIR");
  std::string pattern = std::string(dir != nullptr && *dir != '\0' ? dir : "/tmp") + "/clausewright-stdin-XXXXXX";
  std::vector<char> path(pattern.begin(), pattern.end());
  path.push_back('\0');
  const int fd = ::mkstemp(path.data());
  if (fd < 0) fail("cannot create a temporary file for " + name);
  ::unlink(path.data());
  std::vector<char> block(std::size_t{1} << 20);
  for (;;) {
    const ::ssize_t n = ::read(from, block.data(), block.size());
    if (n < 0) {
      if (errno == EINTR) continue;
      const int saved = errno;
      ::close(fd);
      errno = saved;
      fail("reading " + name + " failed");
    }
    if (n == 0) break;
    for (::ssize_t done = 0; done < n;) {
      const ::ssize_t w = ::write(fd, block.data() + done, static_cast<std::size_t>(n - done));
      if (w < 0) {
        if (errno == EINTR) continue;
        const int saved = errno;
        ::close(fd);
        errno = saved;
        fail("copying " + name + " to a temporary file failed");
      }
      done += w;
    }
  }
  if (::lseek(fd, 0, SEEK_SET) != 0) {
    ::close(fd);
    fail("rewinding the copy of " + name + " failed");
  }
  return fd;
}

}  // namespace

file_source::file_source(const std::string& path) : name_(path == "-" ? "<stdin>" : path) {
  if (path == "-") {
    // Standard input redirected from a file can be read again as it is.
    struct stat in {};
    if (::fstat(STDIN_FILENO, &in) == 0 && S_ISREG(in.st_mode) && ::lseek(STDIN_FILENO, 0, SEEK_CUR) == 0) {
      fd_ = ::fcntl(STDIN_FILENO, F_DUPFD_CLOEXEC, 0);
      if (fd_ < 0) fail("cannot read standard input");
      identity_ = file_identity{static_cast<std::uint64_t>(in.st_dev), static_cast<std::uint64_t>(in.st_ino)};
      return;
    }
    fd_ = spool(STDIN_FILENO, "standard input");
    return;
  }
  fd_ = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd_ < 0) fail("cannot open " + path);
  struct stat st {};
  if (::fstat(fd_, &st) != 0) {
    const int saved = errno;
    ::close(fd_);
    fd_ = -1;
    errno = saved;
    fail("cannot read " + path);
  }
  if (S_ISDIR(st.st_mode)) {
    ::close(fd_);
    fd_ = -1;
    throw error(error_id::io, "cannot read " + path + ": it is a directory");
  }
  if (!S_ISREG(st.st_mode)) {
    // A pipe (`<(command)`), a FIFO or a device is read once, as standard
    // input is: spooled into a temporary file that can be read again.
    const int from = fd_;
    fd_ = -1;
    try {
      fd_ = spool(from, path);
    } catch (...) {
      ::close(from);
      throw;
    }
    ::close(from);
    return;
  }
  identity_ = file_identity{static_cast<std::uint64_t>(st.st_dev), static_cast<std::uint64_t>(st.st_ino)};
}

file_source::~file_source() {
  if (fd_ >= 0) ::close(fd_);
}

std::size_t file_source::read(char* data, std::size_t size) {
  for (;;) {
    const ::ssize_t n = ::read(fd_, data, size);
    if (n >= 0) return static_cast<std::size_t>(n);
    if (errno != EINTR) fail("reading " + name_ + " failed");
  }
}

void file_source::rewind() {
  if (::lseek(fd_, 0, SEEK_SET) != 0) fail("cannot read " + name_ + " a second time");
}

std::size_t memory_source::read(char* data, std::size_t size) {
  const std::size_t n = std::min(size, bytes_.size() - position_);
  std::memcpy(data, bytes_.data() + position_, n);
  position_ += n;
  return n;
}

}  // namespace clausewright::tool
