package cli

import (
	"quadtrace/app/outfile"
)

// prepareOutput is the one place where every command checks a file it is
// about to write, before any work, under app/outfile's rules: out must not
// be one of the command's inputs (by path, symlink or hard link), nor a
// folder or any other non-regular file (a device, a pipe, a socket), nor a
// symbolic link unless follow is set. The writers then put out in place
// only complete, through app/outfile, making missing folders.
func prepareOutput(out string, follow bool, inputs ...string) error {
	return outfile.Check(out, outfile.Options{Inputs: inputs, FollowSymlink: follow})
}
