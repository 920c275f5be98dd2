// Package report renders what spade's evaluate finds for a person: as text
// in 80 columns for a terminal (WriteEvaluation), and as a season's report,
// an HTML page with its pictures in one folder that works offline.
//
// It writes to the writers and folders it is given and never prints.
package report
