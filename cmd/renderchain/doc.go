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
// Non-goals: an interactive interface, audio playback, plug-in hosting.
package main
