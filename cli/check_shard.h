// `loopwright check CASE --shard K/N`: only the K-th of N contiguous slices
// of the envelope's sweep blocks (kSweepBlock points each, every block's
// first point cold and the rest warm from the point before:
// network/envelope/sweep.h), written as a partial result; and the merge of
// the N partial results into the document, CSV, summary and exit code of
// the unsharded `check`, byte for byte.
//
// A partial result (JSON, member "kind": kCheckPartKind) holds a "header"
// that every part of one run shares (format, loopwright version, the case
// file as given and the FNV-1a 64 digest of its bytes, the number of points,
// the block size, and the settings that change the document: --json-detail,
// --no-fix, --tight), its shard and N, its point range, and per point the
// text the document holds for it (network/envelope/results.h, PointText), its
// check outcomes, its model warnings and, without a result, its cause. What
// needs the whole envelope (the summary's worst points, the verdict, the
// fixes, which re-solve their governing points from the case alone) is
// computed in the merge.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cli/check_run.h"

namespace loopwright::cli {

inline constexpr const char* kCheckPartKind = "loopwright-check-part";
inline constexpr int kCheckPartFormat = 1;

// Solves shard `shard` (0-based) of `shards` and writes its partial result
// to c.json_out (atomically). `path` is the case file as given. Exit code:
// 0 written (whatever the checks say: the merge gives the verdict), 4 when
// it cannot be written.
int CheckShard(const Case& cs, const std::string& path, const Common& c, bool no_fix, int threads, double tight,
               int shard, int shards);

// Merges partial results of `check --shard` (`names`: their files) into
// c.json_out and c.csv_out and prints check's summary; the case is read
// from `case_path`, or from the path the parts give when it is "". Exit
// code: check's (0, 1, 3); 2 when the parts do not belong together or the
// case differs from the one they solved (the file and the reason named).
int MergeCheckParts(const std::vector<nlohmann::json>& parts, const std::vector<std::string>& names,
                    const std::string& case_path, const Common& c);

}  // namespace loopwright::cli
