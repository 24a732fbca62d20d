//go:build race

package main

// raceEnabled: the race detector slows the crash test's subprocesses about
// tenfold, so it runs on a smaller corpus (see TestArchiveSurvivesSIGKILL).
const raceEnabled = true
