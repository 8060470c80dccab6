// Package atomicfile writes output files so that readers never see them half
// written, and so that a bad output name is refused before any work is done.
// Every command that writes a file (corpus generation, reports, pictures, the
// demo town) goes through [Write] or [WriteBytes].
//
// What it promises, for a target that is, or will be, a regular file:
//
//   - Readers of the target see the old content or the new, never a mix: the
//     content goes into a temporary file ".NAME.tmp-RANDOM" in the target's own
//     folder, is synced, and is renamed over the target (a rename within one
//     folder is atomic).
//   - On any error, the target is left as it was and the temporary file is
//     removed. If the process gets SIGINT or SIGTERM while a write is in flight,
//     the temporary files are removed and the process then ends by that signal
//     (a shell reports status 130 for SIGINT, 143 for SIGTERM); see signal.go.
//   - A symbolic link is written through: its target gets the new content and
//     the link stays. A link to nothing creates the file it names, as a shell's
//     ">" does.
//   - An existing file keeps its permission bits and, when the process runs as
//     root, its owner and group. A new file gets mode 0644 less the umask.
//
// What it refuses, with a [*TargetError] naming the path, before calling the
// caller's write function:
//
//   - a folder ("adir is a folder; give a file name"), and a name in a folder
//     that does not exist or cannot be written;
//   - a file with no write bit for anyone (mode 0444), even as root, who could
//     otherwise replace it; and, for other users, a file access(2) says they
//     may not write;
//   - block devices, named pipes (FIFOs) and sockets, other than the standard
//     output and error: they are never replaced.
//
// Two kinds of target are written in place, neither atomically nor replaced:
//
//   - the process's own standard output or standard error, however named
//     (/dev/stdout, /proc/self/fd/2, or the file the shell redirected it to),
//     whatever it is (a file, a pipe, a terminal): the output goes to the
//     descriptor, so that what the shell set up (">", ">>", "|") holds and
//     nothing else written there is lost;
//   - a character device (/dev/null, /dev/full, a terminal): there is no
//     half-written state to hide, and replacing the device node breaks the
//     machine (it did: run as root, "-o /dev/full" made /dev/full a regular
//     file).
//
// [Check] makes the same refusals without writing, so that a command can stop
// at once on a bad output name rather than after minutes of work; Write calls
// it first. Between Check and the rename, the file system may change: Write's
// rename fails or wins as the kernel decides.
//
// Out of scope: the rename is not made durable by syncing the folder; hard
// links to the target keep the old content (the name gets a new file);
// extended attributes and ACLs are not copied.
package atomicfile
