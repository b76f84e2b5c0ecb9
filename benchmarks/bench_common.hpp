#pragma once
// Helpers shared by the C++ benchmarks: timing, medians, pipe I/O for the forked children, and
// the JSON and machine facts every results file carries.

#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <fstream>
#include <limits>
#include <string>
#include <vector>

namespace corral_bench {

using Clock = std::chrono::steady_clock;

inline double seconds_since(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}

// Pipe I/O between a benchmark and the child process it forks for each measurement.
inline bool write_all(int fd, const void* p, size_t len) {
  const char* c = static_cast<const char*>(p);
  while (len > 0) {
    const ssize_t k = ::write(fd, c, len);
    if (k < 0 && errno == EINTR) continue;
    if (k <= 0) return false;
    c += k;
    len -= static_cast<size_t>(k);
  }
  return true;
}

inline size_t read_all(int fd, void* p, size_t len) {
  char* c = static_cast<char*>(p);
  size_t got = 0;
  while (got < len) {
    const ssize_t k = ::read(fd, c + got, len - got);
    if (k < 0 && errno == EINTR) continue;
    if (k <= 0) break;
    got += static_cast<size_t>(k);
  }
  return got;
}

inline std::string json_escape(const std::string& s) {
  std::string r;
  for (char c : s) {
    if (c == '"' || c == '\\') {
      r += '\\';
      r += c;
    } else if (static_cast<unsigned char>(c) < 0x20) {
      r += ' ';
    } else {
      r += c;
    }
  }
  return r;
}

inline std::string json_num(double v) {
  if (!std::isfinite(v)) return "null";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

inline std::string cpu_model() {
  std::ifstream f("/proc/cpuinfo");
  std::string line;
  while (std::getline(f, line))
    if (line.rfind("model name", 0) == 0) {
      const auto p = line.find(':');
      if (p != std::string::npos) return line.substr(p + 2);
    }
  return "unknown";
}

inline std::string now_utc() {
  const std::time_t t = std::time(nullptr);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", std::gmtime(&t));
  return buf;
}

inline double median(std::vector<double> v) {
  if (v.empty()) return std::numeric_limits<double>::quiet_NaN();
  std::sort(v.begin(), v.end());
  const size_t k = v.size();
  return k % 2 ? v[k / 2] : 0.5 * (v[k / 2 - 1] + v[k / 2]);
}

}  // namespace corral_bench
