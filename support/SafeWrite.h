// SafeWrite.h - the one routine every saltpan output is written through, and the checks that
// keep an output from replacing an input or another output.
//
// A write never follows a link planted at the destination, never turns a device or FIFO into a
// regular file, and never leaves a half-written file: the text goes to a fresh temporary
// (O_CREAT|O_EXCL|O_NOFOLLOW, random name) in the destination's directory, is flushed to disk,
// and is renamed over the destination. The standalone executables link this too.
#pragma once
#include <string>
#include <string_view>
#include <vector>

namespace saltpan {

struct WriteOptions {
  /// New files get 0777 & ~umask instead of 0666 & ~umask; an existing file keeps its mode
  /// with execute permission added wherever it has read permission.
  bool executable = false;
  /// The written file keeps the destination's owner and group (saltpan fmt); when that is not
  /// possible the write is refused, unless `ownerBestEffort`.
  bool keepOwner = false;
  bool ownerBestEffort = false;
};

/// Writes `text` to `path`: "-" is standard output; anything else is replaced atomically
/// (temporary, fsync, rename). A destination that is a directory, device, FIFO or socket is
/// refused; a symbolic link or hard link at the destination is replaced, never written through.
/// An existing file's mode (without set-user/group-ID) is kept. The temporary is removed if
/// SIGINT or SIGTERM arrives during the write. Returns false with `error` on failure.
bool writeFileAtomically(const std::string &path, std::string_view text, std::string &error,
                         const WriteOptions &options = {});

/// Why `path` cannot be an output ("'/dev/null' is a character device, not a regular file"), or
/// "" when it can: absent, a regular file, a symbolic link (replaced), or "-".
std::string unwritableReason(const std::string &path);

/// A file named on the command line: its option ("-o", "--plot", "the spec") and its path.
struct NamedFile {
  std::string role;
  std::string path;
};

/// The first clash among `outputs` and `inputs`, as a message, or "": an output that cannot be
/// written (unwritableReason), two outputs that are one file, or an output that is one of the
/// inputs. Files are compared by device and inode (an absent output by its directory's device
/// and inode and its name), never by spelling, so "x.csv", "./x.csv" and a hard link all clash.
std::string findOutputClash(const std::vector<NamedFile> &outputs, const std::vector<NamedFile> &inputs);

/// Characters in `name` (a file name the linker is given) that a compiler driver or linker
/// reads as syntax, described for a message ("a comma"), or "" when there are none.
std::string linkerSpecialCharacter(const std::string &name);

} // namespace saltpan
