// Package tempfile creates the temporary files that atomic writers rename
// into place. Unlike os.CreateTemp (mode 0600), it creates them with mode
// 0666 so that the process umask applies, as it does to any file a
// program creates (POSIX open(2)): the renamed file then has the
// permissions the user expects.
package tempfile
