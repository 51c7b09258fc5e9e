// Package outputs makes sure a command never loses a file: every path it
// writes is checked before any work, every output is written beside its
// target and put in place only when the whole command succeeded, all
// outputs of one command together or none, and nothing is left behind on
// an error or a signal.
//
// # Use
//
// A command declares what it reads and writes, checks, works, commits:
//
//	set := outputs.New()
//	set.Input("in", dryPath)
//	wav := set.File("out", outPath)
//	rep := set.File("report", reportPath)
//	if err := set.Check(); err != nil {
//		return err // e.g. "report x.wav: is the same file as an input (in x.wav): ..."
//	}
//	defer set.Abort()
//	... write to wav and rep (io.WriteSeeker) ...
//	return set.Commit()
//
// Check compares paths by device and inode (os.SameFile), so a symbolic
// link, a hard link or another spelling of an input is refused; it proves
// each folder writable by creating the temporary file there, and refuses
// folders, block devices and sockets as file targets. Errors are one-line
// *PathError values naming the role the caller gave the path (its flag),
// each wrapping one sentinel (ErrSameAsInput, ErrNoFolder, ...).
//
// Commit keeps every existing target as a hidden backup (a hard link) until
// every new file is in place, and undoes the renames done so far if one
// fails, so an existing file is never removed unless its replacement is in
// place. A character device or FIFO target (/dev/null, a named pipe) is
// written in place, never renamed over. A folder output (Dir) is built in a
// hidden work folder and moved in on Commit.
//
// Watch is the one call a program makes at start: the first SIGINT,
// SIGTERM, SIGHUP or SIGQUIT cancels its context; if the program has not
// finished within a grace period, or on a second signal, Cleanup removes
// every temporary file of the process and the program exits.
//
// Two runs writing one target race; the last to commit wins. Commit notices
// a target that changed since Check and lists it in Changed, so a command
// can say so.
//
// # References
//
//   - IEEE Std 1003.1-2017 (POSIX.1): rename(2) replaces the target
//     atomically within one file system; link(2); fsync(2) on a file and on
//     its folder for durability; access(2); the signal numbers and the
//     128 + n exit status a shell reports (common practice).
//   - The Go standard library's os.SameFile and os.CreateTemp.
//
// # Non-goals
//
// No locking between processes (two runs on one target are reported, not
// prevented); no atomicity across file systems (every temporary file sits
// in its target's folder, so none is needed); no undo of what was already
// written into a device or FIFO; no Windows-specific replace semantics.
package outputs
