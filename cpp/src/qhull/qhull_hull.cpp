// Convex hulls through qhull's reentrant library, libqhull_r: quickhull (Barber, Dobkin &
// Huhdanpaa 1996, "The Quickhull algorithm for convex hulls", ACM TOMS 22(4)).
//
// CONFIGURATION. Three option sets, tried in turn (qhull_option_ladder):
// 1. qhull's defaults ("qhull" and nothing else): facets are merged when qhull cannot tell
//    them apart in floating point (its default C-0, plus Qx from 5-D up), and nothing is
//    triangulated.
// 2. "C-0 Q12": merging as above without Qx, and a merge wider than qhull's own estimate of
//    its rounding error is allowed rather than raised as an error. It is tried when the first
//    run raises a precision error or its answer fails validation. Measured on the polar point
//    clouds of simplicial polytopes (random points in R^3..R^6, every vertex in many facets):
//    the defaults raised "wide merge" or "large increase in max_outside" errors in 9 of 1,000
//    cases, "C-0 Q12" in none, at the same speed; every one of the 9 passed validation on the
//    second run.
// 3. "C-0 Q12 Q14": as 2, and vertices where qhull finds a pinched ridge ("dupridge") are
//    merged. Found in a stress run of vertex enumeration (the facets of the hull of integer
//    points in R^6, every vertex in many rows; tests/cpp/data): the defaults stop with a
//    "wide merge due to dupridge" error, 2's answer fails validation (a row outside a vertex
//    by 0.0035), 3's validates. Such a case was about 1 in 1,500 of the stress run; without
//    a valid qhull answer the call goes to exact cddlib, which took minutes on it.
// Why merging, and why that is safe here:
// - Without merging (Q0), degenerate input such as a box (many points per facet) either
//   raises qhull precision errors or comes back as slivers; both would send the commonest
//   inputs of this library to exact cddlib, which is orders of magnitude slower.
// - A merged facet is not trusted: qhull's answer is only combinatorics (the points on each
//   facet and the ridges between facets); every hyperplane is recomputed from the caller's
//   own data, and a facet that qhull merged from pieces that are not one hyperplane within
//   the caller's tolerance fails validation (all its points must be tight at the one
//   recomputed hyperplane; detail/hull_check.hpp), and the answer then comes from the next
//   option set or exact cddlib. A merge that qhull made within the tolerance is a facet at
//   that tolerance; Q12 lets qhull make wider ones, which validation judges the same way.
// - Options change qhull's speed little on the inputs measured (random polytopes, n = 3 and
//   5, 500 points: "", Qt, Q0, Qx and Q0 Qt within 15 % of one another).
// Messages go to a stream in memory that is read back for the error text.

#include <corral/detail/qhull.hpp>

#include <algorithm>
#include <csetjmp>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

extern "C" {
#include <libqhull_r/qhull_ra.h>
}

namespace corral::detail {
namespace {

// Everything the C-style frame reads and writes: plain data only. Arrays are malloc'ed by
// read_facets and freed by the caller.
struct QhullCall {
  int dim;
  int num_points;
  double* points;     // num_points * dim, row after row (qhull does not modify it)
  char* command;      // "qhull <options>"
  FILE* errfile;      // qhull's messages
  long num_facets;    // out
  int* facet_start;   // out: num_facets + 1 offsets into facet_points
  int* facet_points;  // out: point ids of the vertices of each facet
  long num_ridges;    // out: ridge entries (each ridge once per facet it bounds)
  int* ridge_owner;   // out: facet index of each ridge entry
  int* ridge_points;  // out: dim - 1 point ids per ridge entry
  long num_merged;    // out: facets that are not simplicial or come from merges
  int exit_code;      // out
  int read_error;     // out: 1 malformed output, 2 out of memory
};

// Reads the facets and ridges of a finished run. Called under the caller's setjmp: a qhull
// error raised here (qh_setsize checks its sets) jumps back to run_qhull, not through C++
// frames. A simplicial facet's ridges are its vertex sets without one vertex; a
// non-simplicial (merged) facet lists its ridges explicitly, each a simplex of dim - 1
// vertices (several may lie between the same two facets).
void read_facets(qhT* qh, QhullCall* c) {
  facetT* facet;
  vertexT *vertex, **vertexp;
  ridgeT *ridge, **ridgep;
  const int d = c->dim;
  long nf = 0, nv = 0, nr = 0;
  FORALLfacets {
    ++nf;
    nv += qh_setsize(qh, facet->vertices);
    nr += facet->simplicial ? d : qh_setsize(qh, facet->ridges);
  }
  c->facet_start = static_cast<int*>(std::malloc(sizeof(int) * static_cast<size_t>(nf + 1)));
  c->facet_points = static_cast<int*>(std::malloc(sizeof(int) * static_cast<size_t>(nv + 1)));
  c->ridge_owner = static_cast<int*>(std::malloc(sizeof(int) * static_cast<size_t>(nr + 1)));
  c->ridge_points =
      static_cast<int*>(std::malloc(sizeof(int) * static_cast<size_t>((nr + 1) * (d - 1))));
  if (!c->facet_start || !c->facet_points || !c->ridge_owner || !c->ridge_points) {
    c->read_error = 2;
    return;
  }
  long f = 0, v = 0, r = 0;
  FORALLfacets {
    c->facet_start[f] = static_cast<int>(v);
    if (!facet->simplicial || facet->nummerge > 0) ++c->num_merged;
    FOREACHvertex_(facet->vertices) { c->facet_points[v++] = qh_pointid(qh, vertex->point); }
    if (facet->simplicial) {
      if (v - c->facet_start[f] != d) {
        c->read_error = 1;
        return;
      }
      for (int j = 0; j < d; ++j, ++r) {
        c->ridge_owner[r] = static_cast<int>(f);
        int q = 0;
        for (int p = 0; p < d; ++p)
          if (p != j) c->ridge_points[r * (d - 1) + q++] = c->facet_points[c->facet_start[f] + p];
      }
    } else {
      FOREACHridge_(facet->ridges) {
        if (qh_setsize(qh, ridge->vertices) != d - 1) {
          c->read_error = 1;
          return;
        }
        c->ridge_owner[r] = static_cast<int>(f);
        int q = 0;
        FOREACHvertex_(ridge->vertices) {
          c->ridge_points[r * (d - 1) + q++] = qh_pointid(qh, vertex->point);
        }
        ++r;
      }
    }
    ++f;
  }
  c->facet_start[f] = static_cast<int>(v);
  c->num_facets = f;
  c->num_ridges = r;
}

// The one C-style frame around qhull: no C++ object with a destructor lives in it, so the
// longjmp of qhull's error handling (inside qh_new_qhull, and the guard around read_facets)
// never unwinds a C++ frame.
void run_qhull(QhullCall* c) {
  qhT* qh = static_cast<qhT*>(std::malloc(sizeof(qhT)));
  if (qh == nullptr) {
    c->exit_code = qh_ERRmem;
    return;
  }
  QHULL_LIB_CHECK  // the headers match the library (a mismatch is a broken installation)
      qh_zero(qh, c->errfile);
  c->exit_code =
      qh_new_qhull(qh, c->dim, c->num_points, c->points, False, c->command, nullptr, c->errfile);
  if (c->exit_code == 0) {
    qh->NOerrexit = False;
    if (setjmp(qh->errexit) == 0) read_facets(qh, c);
    else c->exit_code = qh_ERRqhull;
    qh->NOerrexit = True;
  }
  qh_freeqhull(qh, !qh_ALL);
  int curlong = 0, totlong = 0;
  qh_memfreeshort(qh, &curlong, &totlong);
  std::free(qh);
}

// Where qhull writes its messages: a stream in memory (POSIX open_memstream), or a temporary
// file where that is not available (a file costs a file-system round trip per call, as much
// as the hull of a few hundred points in 3-D).
class MessageSink {
 public:
  MessageSink() {
#if defined(_POSIX_C_SOURCE) && _POSIX_C_SOURCE >= 200809L
    file_ = open_memstream(&mem_, &size_);
#endif
    if (file_ == nullptr) file_ = std::tmpfile();
  }
  MessageSink(const MessageSink&) = delete;
  MessageSink& operator=(const MessageSink&) = delete;
  ~MessageSink() {
    if (file_ != nullptr) std::fclose(file_);
    std::free(mem_);
  }
  FILE* file() const { return file_; }

  // The first line that names an error (QH6xxx / QH7xxx), or the first line, at most `limit`
  // characters.
  std::string first_error_line(size_t limit) {
    std::fflush(file_);
    std::string text;
    if (mem_ != nullptr) {
      text.assign(mem_, std::min(size_, 16 * limit));
    } else {
      std::rewind(file_);
      char buf[512];
      size_t got;
      while (text.size() < 16 * limit && (got = std::fread(buf, 1, sizeof buf, file_)) > 0)
        text.append(buf, got);
    }
    size_t start = text.find("QH6");
    if (start == std::string::npos) start = text.find("QH7");
    if (start == std::string::npos) start = 0;
    std::string line = text.substr(start, text.find('\n', start) - start);
    if (line.size() > limit) line = line.substr(0, limit) + "...";
    return line.empty() ? "no message" : line;
  }

 private:
  FILE* file_ = nullptr;
  char* mem_ = nullptr;
  size_t size_ = 0;
};

}  // namespace

const char* qhull_default_options() { return ""; }

const std::vector<std::string>& qhull_option_ladder() {
  static const std::vector<std::string> ladder{qhull_default_options(), "C-0 Q12", "C-0 Q12 Q14"};
  return ladder;
}

QhullRun qhull_hull(const Matrix& points, const std::string& options) {
  QhullRun run;
  const Index n = points.cols(), k = points.rows();
  if (n < 2 || k < n + 1) {
    run.exit_code = qh_ERRinput;
    run.message = "qhull: needs dimension >= 2 and at least dimension + 1 points";
    return run;
  }
  std::vector<double> coords(points.data(), points.data() + points.size());  // row-major
  std::string command = "qhull " + options;
  std::vector<char> cmd(command.begin(), command.end());
  cmd.push_back('\0');
  MessageSink messages;
  if (messages.file() == nullptr) {
    run.exit_code = qh_ERRother;
    run.message = "qhull: could not open a stream for its messages";
    return run;
  }
  QhullCall call{};
  call.dim = static_cast<int>(n);
  call.num_points = static_cast<int>(k);
  call.points = coords.data();
  call.command = cmd.data();
  call.errfile = messages.file();
  run_qhull(&call);
  run.exit_code = call.exit_code;
  if (call.exit_code == 0 && call.read_error == 0) {
    run.ok = true;
    run.facet_start.assign(call.facet_start, call.facet_start + call.num_facets + 1);
    run.facet_points.assign(call.facet_points, call.facet_points + run.facet_start.back());
    run.ridge_owner.assign(call.ridge_owner, call.ridge_owner + call.num_ridges);
    run.ridge_points.assign(call.ridge_points, call.ridge_points + call.num_ridges * (n - 1));
    run.merged_facets = call.num_merged;
  } else if (call.exit_code == 0) {
    run.message = call.read_error == 1 ? "qhull: malformed facet or ridge in its output"
                                       : "qhull: out of memory reading its output";
  } else {
    run.message = "qhull (exit code " + std::to_string(call.exit_code) +
                  "): " + messages.first_error_line(300);
  }
  std::free(call.facet_start);
  std::free(call.facet_points);
  std::free(call.ridge_owner);
  std::free(call.ridge_points);
  return run;
}

}  // namespace corral::detail
