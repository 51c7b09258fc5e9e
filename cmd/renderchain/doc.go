// Command renderchain renders a dry guitar recording through a fuzz, tone
// and volume circuit simulated at the component level and reports what the
// circuit does: processed audio, levels, THD and harmonics, frequency
// response, spectra and bias points.
//
// The command is a thin layer over the packages: flags, help, progress on
// stderr, tables for people, and one adapter between the packages' errors
// and the command line (errors.go). Every value a flag carries is read by
// its quantity's parser in package models (a wrong value is a usage error
// naming the flag); the packages take typed values and name the option
// field they refuse in a *models.FieldError, which adapt maps to the
// command's flag through fieldFlags. Exit statuses use the CLI library's
// own mechanism (cli.ExitCoder, OnUsageError): 0 done, 1 bad input such as
// a file, a chain, a value or key in a file or an override, 2 a wrong
// command line. Messages are one line.
//
// Outputs and signals: each command declares every path it reads and
// writes in one outputs.Set (outputs.go: the chain file as an input, the
// flags as roles), checks it before any work, and commits all its outputs
// together after the work (or none); an *outputs.PathError names the flags
// (adaptPath). main runs under outputs.Watch: SIGINT, SIGTERM, SIGHUP and
// SIGQUIT cancel the command's context, every solver loop checks it, the
// deferred Abort removes the temporary files, and the exit status is 128 +
// the signal's number.
//
// Non-goals: an interactive interface, audio playback, plug-in hosting.
package main
