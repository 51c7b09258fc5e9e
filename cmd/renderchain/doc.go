// Command renderchain renders a dry guitar recording through a fuzz, tone
// and volume circuit simulated at the component level and reports what the
// circuit does: processed audio, levels, THD and harmonics, frequency
// response, spectra and bias points.
//
// The command is a thin layer over the packages: flags, help, exit codes
// (0 done, 1 bad input such as a file, value or key, 2 a wrong command
// line), one-line error messages and progress on stderr. Every command's
// work lives in a package that tests call without the CLI.
//
// Non-goals: an interactive interface, audio playback, plug-in hosting.
package main
